/** The sentence a drift verdict stands for, as the station page and the list show it. */
import type { ChannelDrift, DriftVerdict } from './drift.js';
import { DRIFT_DEFAULTS } from './drift.js';

/** How the sentence writes a day: e.g. "22 Nov" in the site's time zone. */
export interface SentenceFormat {
  day: (ms: number) => string;
}

/** A length in metres as millimetres: one decimal below 10 mm ("4.2 mm"), whole above ("21 mm"). */
export function millimetres(m: number): string {
  const mm = m * 1000;
  return `${Math.abs(mm) < 9.95 ? mm.toFixed(1) : mm.toFixed(0)} mm`;
}

/** An angle in radians as degrees with one decimal ("1.4°"). */
export function degrees(rad: number): string {
  return `${((rad * 180) / Math.PI).toFixed(1)}°`;
}

/** A p-value as "p < 0.001" or "p = 0.004". */
export function pText(p: number): string {
  return p < 0.001 ? 'p < 0.001' : `p = ${Number(p.toPrecision(2))}`;
}

const YEAR_MS = 365 * 86_400_000;
const amount = (c: ChannelDrift, v: number) => (c.channel === 'position' ? millimetres(v) : degrees(v));
const rate = (c: ChannelDrift, v: number) => (c.channel === 'position' ? `${(v * 1000).toFixed(2)} mm` : `${((v * 180) / Math.PI).toFixed(2)}°`);
const side = (c: ChannelDrift, v: number) => `${v > c.tolerance ? 'beyond' : 'within'} the ${amount(c, c.tolerance)} tolerance`;

function drifting(c: ChannelDrift, f: SentenceFormat): string {
  if (c.finding === 'step') {
    const s = c.step;
    const verb = c.channel === 'position' ? 'Moved' : 'Turned';
    return `${verb} about ${amount(c, s.shift)} around ${f.day(s.atMs)} (Pettitt change-point test, ${pText(s.pValue)}): the median offset since then is ${amount(c, s.offsetAfter)}, ${side(c, s.offsetAfter)}.`;
  }
  const t = c.trend!;
  const what = c.channel === 'position' ? 'Creeping' : 'Turning';
  const head = `${what} ${rate(c, t.speedPerDay)} a day (Theil–Sen slope of the daily medians; Mann–Kendall test, ${pText(t.pValue)})`;
  const now = `the fitted offset is ${amount(c, t.offsetNow)} now`;
  if (t.offsetNow >= c.tolerance) return `${head}: ${now}, past the ${amount(c, c.tolerance)} tolerance${t.crossingMs !== null ? ` since about ${f.day(t.crossingMs)}` : ''}.`;
  return `${head}: ${now} and at this rate passes the ${amount(c, c.tolerance)} tolerance around ${f.day(t.crossingMs!)}.`;
}

/** The one- or two-sentence reading of a verdict, naming the test behind it and its figures. */
export function driftSentence(v: DriftVerdict, f: SentenceFormat, recentDays = DRIFT_DEFAULTS.recentDays): string {
  if (v.state === 'insufficient' || !v.position || !v.heading) {
    return `No verdict yet: ${v.results} ${v.results === 1 ? 'docking' : 'dockings'} in the window; the drift check needs at least ${DRIFT_DEFAULTS.minResults}.`;
  }
  const lead = v.channel === 'heading' ? v.heading : v.position;
  if (v.state === 'drifting') return drifting(lead, f);
  if (v.state === 'out_of_tolerance') {
    return `No drift in the window, but the median offset of the last ${recentDays} days is ${amount(lead, lead.recentOffset!)}, beyond the ${amount(lead, lead.tolerance)} tolerance: the station model may not match the station as installed.`;
  }
  const p = v.position;
  const recent = p.recentOffset === null ? `no docking in the last ${recentDays} days` : `median offset of the last ${recentDays} days ${amount(p, p.recentOffset)} (tolerance ${amount(p, p.tolerance)})`;
  let text = `Steady: no step or trend in the mean offset beyond the thresholds (Pettitt and Mann–Kendall tests at 1 %); ${recent}.`;
  // A creep that would take more than a year to reach the tolerance is not worth a sentence.
  const creeping = [v.position, v.heading].find((c) => c.trend?.significant && c.trend.crossingMs !== null && c.trend.crossingMs - v.atMs < YEAR_MS);
  if (creeping) text += ` A slow ${creeping.channel === 'position' ? 'creep' : 'turn'} of ${rate(creeping, creeping.trend!.speedPerDay)} a day would reach the tolerance around ${f.day(creeping.trend!.crossingMs!)}.`;
  return text;
}
