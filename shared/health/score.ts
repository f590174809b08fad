import { fitTrend, thresholdCrossing } from '../stats/trend.js';

/** Health bands of a map (DESIGN.md §4.3). */
export type HealthBand = 'good' | 'watch' | 'remap_advised';

/** Band limits in percent: good at or above `goodMin`, watch at or above `watchMin`, else remap advised. */
export interface BandLimits {
  goodMin: number;
  watchMin: number;
}

/** Map health score in percent (0–100): the share of returns the map explains; null without returns. */
export function healthScore(explained: number, returns: number): number | null {
  return returns > 0 ? (100 * explained) / returns : null;
}

/** The band a score falls in. */
export function healthBand(score: number, limits: BandLimits): HealthBand {
  return score >= limits.goodMin ? 'good' : score >= limits.watchMin ? 'watch' : 'remap_advised';
}

/** When a falling health series reaches a threshold: day numbers relative to the last day of the series. */
export interface HealthForecast {
  /** Change of the score per day, percentage points. */
  slopePerDay: number;
  /** Standard error of the slope, points per day. */
  slopeSE: number;
  /** Days after the series' last day at which the trend reaches the threshold; null when it does not fall. */
  daysToThreshold: number | null;
  /** 95 % range of that day (Fieller); Infinity when the fit cannot bound it. */
  earliestDays: number | null;
  latestDays: number | null;
  /** Days of the series the fit used. */
  daysUsed: number;
}

/**
 * Robust linear trend of daily scores (day index, percent) and the day it crosses `threshold`
 * at the present rate; null with fewer than 7 days. A score already below the threshold gives 0.
 */
export function forecastHealth(days: number[], scores: number[], threshold: number): HealthForecast | null {
  if (days.length < 7) return null;
  const fit = fitTrend(days, scores);
  const last = days[days.length - 1];
  const base = { slopePerDay: fit.slope, slopeSE: fit.slopeSE, daysUsed: days.length };
  const now = fit.intercept + fit.slope * last;
  if (now <= threshold) return { ...base, daysToThreshold: 0, earliestDays: 0, latestDays: 0 };
  if (fit.slope >= 0) return { ...base, daysToThreshold: null, earliestDays: null, latestDays: null };
  const crossing = thresholdCrossing(fit, threshold)!;
  return {
    ...base,
    daysToThreshold: crossing.day - last,
    earliestDays: Math.max(0, crossing.earliest - last),
    latestDays: crossing.latest - last,
  };
}
