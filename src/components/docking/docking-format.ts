/*
 * How the Docking tab words and colours a station's verdict and figures. This file imports
 * nothing (like settings-rules.ts), so the browser and the unit tests read the same rules; the
 * types below mirror src/api/docking.api.ts, src/api/types.ts and MapsToneTag.vue.
 */
type DriftState = 'drifting' | 'out_of_tolerance' | 'steady' | 'insufficient';
type ToleranceSource = 'station' | 'site' | 'default';
type Role = 'admin' | 'mapper' | 'site_manager' | 'viewer';
type TagTone = 'teal' | 'amber' | 'slate' | 'ink' | 'red';

const labels: Record<DriftState, string> = { drifting: 'drifting', out_of_tolerance: 'out of tolerance', steady: 'steady', insufficient: 'too few dockings' };
const tones: Record<DriftState, TagTone> = { drifting: 'red', out_of_tolerance: 'amber', steady: 'teal', insufficient: 'slate' };

/** Returns the verdict's word on a tag ("drifting"). */
export const verdictLabel = (state: DriftState): string => labels[state];

/** Returns the verdict's tag tone: drifting red, out of tolerance amber, steady teal, no verdict slate. */
export const verdictTone = (state: DriftState): TagTone => tones[state];

/** Returns where a tolerance comes from, in words. */
export function toleranceSourceText(source: ToleranceSource): string {
  if (source === 'station') return 'set for this station';
  if (source === 'site') return 'site setting';
  return 'product default: common practice for charging contacts (from memory)';
}

/** Returns millimetres with one decimal below 10 mm and none above ("4.2 mm", "18 mm"), with a typographic minus. */
export function millimetres(mm: number): string {
  return `${(Math.abs(mm) < 9.95 ? mm.toFixed(1) : mm.toFixed(0)).replace('-', '−')} mm`;
}

/** Returns degrees with two decimals ("0.35°"). */
export function degreesText(deg: number): string {
  return `${deg.toFixed(2).replace('-', '−')}°`;
}

/** Returns a share 0–1 as a whole percentage ("97 %"), with one decimal between 99 and 100 so that 99.6 % does not read as 100 %. */
export function sharePercentWhole(share: number): string {
  const pct = 100 * share;
  return `${pct > 99 && pct < 100 ? pct.toFixed(1) : Math.round(pct)} %`;
}

/** Returns a p-value as "p < 0.001" or "p = 0.004". */
export function pValueText(p: number): string {
  return p < 0.001 ? 'p < 0.001' : `p = ${Number(p.toPrecision(2))}`;
}

/** What a role may do with stations (the server checks again): add and rename, attach a model, set a station's tolerance. */
export function stationPermissions(role: Role | null) {
  return {
    manage: role === 'admin' || role === 'mapper' || role === 'site_manager',
    attachModel: role === 'admin' || role === 'mapper',
    setTolerance: role === 'admin',
  };
}

/** Returns a time zone's offset from UTC at an instant, minutes (e.g. 60 for Europe/London in summer); 0 for an unknown zone. */
export function zoneOffsetMinutes(timezone: string, ms: number): number {
  try {
    const part = new Intl.DateTimeFormat('en-GB', { timeZone: timezone, timeZoneName: 'longOffset' }).formatToParts(new Date(ms)).find((p) => p.type === 'timeZoneName');
    const m = /GMT([+-])(\d{2}):(\d{2})/.exec(part?.value ?? '');
    return m ? (m[1] === '-' ? -1 : 1) * (Number(m[2]) * 60 + Number(m[3])) : 0;
  } catch {
    return 0;
  }
}

/** Returns the instant (ms) of a site-local wall-clock hour on a site-local day 'YYYY-MM-DD'. */
export function localInstant(day: string, hour: number, timezone: string): number {
  const wall = Date.parse(`${day}T00:00:00Z`) + hour * 3_600_000;
  // The offset at the wall time read as UTC is right except within hours of a clock change; a second look settles it.
  const first = wall - zoneOffsetMinutes(timezone, wall) * 60_000;
  return wall - zoneOffsetMinutes(timezone, first) * 60_000;
}

/** Returns the site-local day 'YYYY-MM-DD' of an instant. */
export function localDayOf(ms: number, timezone: string): string {
  return new Date(ms + zoneOffsetMinutes(timezone, ms) * 60_000).toISOString().slice(0, 10);
}

/** Returns an instant as "22 Nov" or "22 Nov, 14:20" in a time zone, with the year when it is not the year of `reference` ("3 Feb 2027"). */
export function siteDate(ms: number, timezone: string, withTime = false, reference: number = Date.now()): string {
  const year = (t: number) => new Intl.DateTimeFormat('en-GB', { timeZone: timezone, year: 'numeric' }).format(new Date(t));
  const withYear = year(ms) !== year(reference);
  return new Intl.DateTimeFormat('en-GB', { timeZone: timezone, day: 'numeric', month: 'short', ...(withYear ? { year: 'numeric' } : {}), ...(withTime ? { hour: '2-digit', minute: '2-digit' } : {}) }).format(new Date(ms));
}
