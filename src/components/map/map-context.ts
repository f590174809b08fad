import type { InjectionKey, Ref, ShallowRef } from 'vue';
import type * as L from 'leaflet';

/** What MapCanvas shares with the tools placed inside it: the Leaflet map (null until mounted) and whether a tool has taken over clicks. */
export interface SiteMapContext {
  map: ShallowRef<L.Map | null>;
  /** True while the measuring tool uses map clicks, so that clicking a zone adds a point instead of opening the zone. */
  measuring: Ref<boolean>;
}

/** Injection key of the site map's context (provided by MapCanvas). */
export const siteMapContextKey: InjectionKey<SiteMapContext> = Symbol('site-map');

/** Leaflet panes of the site map, bottom to top, with their z-index (Leaflet's tile pane is 200, its overlay pane 400). */
export const mapPanes = {
  blocks: { name: 'dl-blocks', zIndex: 250 },
  paths: { name: 'dl-paths', zIndex: 380 },
  zones: { name: 'dl-zones', zIndex: 420 },
  measure: { name: 'dl-measure', zIndex: 620 },
} as const;
