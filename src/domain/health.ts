import type { HealthBand } from '@/api/types';
import type { TagTone } from '@/components/maps/MapsToneTag.vue';

/** Every band from best to worst, the order of the band filter. */
export const healthBands: readonly HealthBand[] = ['good', 'watch', 'remap_advised'];

const bandWords: Record<HealthBand, string> = { good: 'good', watch: 'watch', remap_advised: 'remap advised' };
// Teal for a healthy map, amber to keep an eye on it, deep red where a remap is due; violet stays the colour of missing structure.
const bandTones: Record<HealthBand, TagTone> = { good: 'teal', watch: 'amber', remap_advised: 'red' };

/** Returns the words of a band ("remap advised"). */
export function bandLabel(band: HealthBand): string {
  return bandWords[band];
}

/** Returns the tag tone of a band: teal good, amber watch, deep red remap advised. */
export function bandTone(band: HealthBand): TagTone {
  return bandTones[band];
}
