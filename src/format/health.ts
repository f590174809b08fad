/** Formatting of health scores, their change and forecast, and zone figures for display. */
import type { HealthForecast } from '@/api/types';
import type { Zone } from '@/api/zones.api';
import { kindPhrase } from '@/domain/zones';

const minus = (text: string) => text.replace('-', '−');

/** Returns a score in percent with one decimal ("93.1 %"). */
export function scorePercent(score: number): string {
  return `${score.toFixed(1)} %`;
}

/** Returns a share (0–1) as a percentage with one decimal ("96.5 %"). */
export function sharePercent(value: number): string {
  return `${(100 * value).toFixed(1)} %`;
}

/** Returns a change in score points with its arrow ("▲ 1.2 points", "▼ 0.8 points", "no change"). */
export function pointsChange(change: number): string {
  const rounded = Math.round(change * 10) / 10;
  if (rounded === 0) return 'no change';
  return `${rounded > 0 ? '▲' : '▼'} ${Math.abs(rounded).toFixed(1)} ${Math.abs(rounded) === 1 ? 'point' : 'points'}`;
}

/** Returns −1, 0 or 1: the direction of a change as it shows once rounded to one decimal. */
export function changeDirection(change: number): -1 | 0 | 1 {
  const rounded = Math.round(change * 10) / 10;
  return rounded === 0 ? 0 : rounded > 0 ? 1 : -1;
}

/** Returns an area in square metres ("6.2 m²"; one decimal, none from 100 m² up). */
export function squareMetres(value: number): string {
  return `${value >= 100 ? Math.round(value).toLocaleString('en-GB') : value.toFixed(1)} m²`;
}

function dayDate(day: string): Date {
  // Site-local calendar days: read them as UTC midnight and format in UTC, so the browser's zone cannot shift the date.
  return new Date(`${day}T00:00:00Z`);
}

/** Returns a site-local day 'YYYY-MM-DD' as "14 Dec", with the year when it is not the year of `reference` ("3 Jan 2027"). */
export function shortDay(day: string, reference: Date = new Date()): string {
  const date = dayDate(day);
  const withYear = date.getUTCFullYear() !== reference.getUTCFullYear();
  return new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: withYear ? 'numeric' : undefined, timeZone: 'UTC' }).format(date);
}

/** Returns a slope in score points per day with sign and two decimals ("−0.21 points/day"). */
export function slopePerDay(slope: number): string {
  return `${minus((slope >= 0 ? '+' : '') + slope.toFixed(2))} points/day`;
}

/**
 * Returns the forecast in one sentence: when, at the present rate, the score reaches the "remap
 * advised" band, with the range the fit's uncertainty allows; or that it is not falling.
 */
export function forecastSentence(forecast: HealthForecast | null, reference: Date = new Date()): string {
  if (!forecast) return 'Too few days with scans for a trend yet (at least 7 are needed).';
  const rate = slopePerDay(forecast.slopePerDay);
  if (forecast.daysToThreshold === 0) return `The trend is already in the ‘remap advised’ band (below ${forecast.threshold} %); present rate ${rate}.`;
  if (forecast.daysToThreshold === null || forecast.crossesOn === null) return `No downward trend (${rate} over the last ${forecast.daysUsed} days with scans).`;
  const crosses = shortDay(forecast.crossesOn, reference);
  const earliest = forecast.earliestOn ? shortDay(forecast.earliestOn, reference) : null;
  const latest = forecast.latestOn ? shortDay(forecast.latestOn, reference) : null;
  // An open latest date means the fit cannot rule out a flat trend; say so rather than invent an end to the range.
  const range = earliest && latest ? ` (between ${earliest} and ${latest})` : earliest ? ` (from ${earliest} on; the fit cannot rule out a flat trend)` : '';
  return `At the present rate (${rate}) the score reaches the ‘remap advised’ band around ${crosses}${range}.`;
}

/** Returns a hit rate (0–1) with two decimals ("0.91"). */
export function hitRate(value: number): string {
  return value.toFixed(2);
}

/** Returns a hit rate with its interval ("0.91 (0.88–0.93)"). */
export function hitRateWithInterval(value: number, interval: [number, number]): string {
  return `${hitRate(value)} (${hitRate(interval[0])}–${hitRate(interval[1])})`;
}

/** Returns the zone panel's sentence: "new structure, persistent, 6.2 m², seen on 11 of 12 days since 3 Nov, hit rate 0.91 (0.88–0.93)". */
export function zoneSentence(zone: Zone, reference: Date = new Date()): string {
  const days = `seen on ${zone.daysFlagged} of ${zone.daysObserved} ${zone.daysObserved === 1 ? 'day' : 'days'} since ${shortDay(zone.firstSeenDay, reference)}`;
  return `${kindPhrase(zone.kind)}, ${zone.persistence}, ${squareMetres(zone.areaM2)}, ${days}, hit rate ${hitRateWithInterval(zone.meanHitRate, zone.hitRateInterval)}`;
}

/** Returns what a 30-day health sparkline shows, for screen readers and tooltips. */
export function seriesLabel(series: { day: string; score: number | null }[], reference: Date = new Date()): string {
  const present = series.filter((d): d is { day: string; score: number } => d.score !== null);
  if (present.length === 0) return `No daily health score in the last ${series.length} days.`;
  const first = present[0];
  const last = present[present.length - 1];
  return `Health score per day over the last ${series.length} days (${present.length} with scans): ${scorePercent(first.score)} on ${shortDay(first.day, reference)}, ${scorePercent(last.score)} on ${shortDay(last.day, reference)}.`;
}
