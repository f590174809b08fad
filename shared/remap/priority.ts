/**
 * Priority of a remap request from its zones' severity and the traffic around them (product
 * choice): severities combine as a noisy-or, 1 − Π(1 − sᵢ), so that several serious zones rank
 * above one; traffic enters as the share T / (T + T_site) of the zones' area-weighted traffic
 * against the mean traffic of the site's active zones, so a change in a busy aisle ranks above the
 * same change in a quiet corner. score = 0.7 · severity part + 0.3 · traffic share, in [0, 1].
 */

/** What priority reads of a zone: severity 0–1, area m², traffic (hits + passes) per m² per day. */
export interface PriorityZone {
  severity: number;
  areaM2: number;
  trafficPerM2PerDay: number;
}

export type PriorityLabel = 'high' | 'medium' | 'low';

/** Weight of the severity part; the traffic share takes the rest (product choice). */
export const SEVERITY_WEIGHT = 0.7;
/** Scores from which a request is "high" and "medium" (product choices). */
export const PRIORITY_HIGH_MIN = 0.6;
export const PRIORITY_MEDIUM_MIN = 0.3;

/** Returns the priority score (0–1) and its label for the zones, against the site's mean zone traffic (per m² per day). */
export function remapPriority(zones: readonly PriorityZone[], siteTrafficPerM2PerDay: number): { score: number; label: PriorityLabel } {
  if (zones.length === 0) return { score: 0, label: 'low' };
  let untouched = 1;
  let area = 0;
  let traffic = 0;
  for (const z of zones) {
    const s = Math.min(1, Math.max(0, z.severity));
    untouched *= 1 - s;
    area += z.areaM2;
    traffic += z.trafficPerM2PerDay * z.areaM2;
  }
  const severityPart = 1 - untouched;
  const t = area > 0 ? traffic / area : 0;
  const share = t + siteTrafficPerM2PerDay > 0 ? t / (t + siteTrafficPerM2PerDay) : 0;
  const score = Math.min(1, Math.max(0, SEVERITY_WEIGHT * severityPart + (1 - SEVERITY_WEIGHT) * share));
  return { score, label: score >= PRIORITY_HIGH_MIN ? 'high' : score >= PRIORITY_MEDIUM_MIN ? 'medium' : 'low' };
}
