import * as L from 'leaflet';
import type { Zone, ZoneKind } from '@/api/zones.api';
import { kindColour, kindPhrase, zoneStatusTag } from '@/domain/zones';
import { ZONE_FILL_OPACITY, ZONE_OUTLINES } from './map-scales';

/** The zones layer on the map: its Leaflet group and how to show a new list of zones. */
export interface ZoneLayer {
  group: L.FeatureGroup;
  update: (zones: readonly Zone[], selectedId: string | null) => void;
}

/**
 * Returns the layer of changed zones: one SVG polygon per zone, coloured by kind, hatched when
 * intermittent (the fill is an SVG pattern, `patternUrl(kind)`, which only the SVG renderer can
 * use; zones are few, so SVG costs nothing here while paths and blocks stay on canvas), outlined by
 * status. Each polygon is a button for keyboards and screen readers; a click or Enter calls `onOpen`
 * unless `isBusy()` (the measuring tool owns clicks then).
 */
export function createZoneLayer(options: { pane: string; patternUrl: (kind: ZoneKind) => string; onOpen: (zoneId: string) => void; isBusy: () => boolean }): ZoneLayer {
  const renderer = L.svg({ pane: options.pane, padding: 0.5 });
  const group = L.featureGroup();
  const shown = new Map<string, { polygon: L.Polygon; zone: Zone; outlineKey: string }>();

  const describe = (zone: Zone) => `Zone ${zone.label}: ${kindPhrase(zone.kind)}, ${zone.persistence}, ${zoneStatusTag(zone.status).label}`;

  function styleOf(zone: Zone, selected: boolean): L.PathOptions {
    // Only zones still to deal with are drawn; any other status keeps the open outline rather than none.
    const outline = zone.status === 'acknowledged' || zone.status === 'planned' ? ZONE_OUTLINES[zone.status] : ZONE_OUTLINES.open;
    const colour = kindColour(zone.kind);
    return {
      renderer,
      pane: options.pane,
      color: colour,
      opacity: 1,
      weight: outline.weight + (selected ? 2 : 0),
      dashArray: outline.dashArray,
      lineCap: outline.lineCap,
      lineJoin: 'round',
      fillColor: zone.persistence === 'intermittent' ? options.patternUrl(zone.kind) : colour,
      fillOpacity: zone.persistence === 'intermittent' ? 1 : ZONE_FILL_OPACITY,
    };
  }

  function decorate(entry: { polygon: L.Polygon; zone: Zone }): void {
    const element = entry.polygon.getElement();
    if (!element) return;
    element.setAttribute('role', 'button');
    element.setAttribute('tabindex', '0');
    element.setAttribute('aria-label', describe(entry.zone));
    element.setAttribute('data-zone-id', entry.zone.id);
    element.setAttribute('data-zone-status', entry.zone.status);
    element.classList.add('dl-zone');
  }

  function open(zoneId: string, event?: L.LeafletEvent): void {
    if (options.isBusy()) return;
    if (event) L.DomEvent.stopPropagation(event);
    options.onOpen(zoneId);
  }

  function update(zones: readonly Zone[], selectedId: string | null): void {
    const keep = new Set(zones.map((z) => z.id));
    for (const [id, entry] of shown) {
      if (!keep.has(id)) {
        group.removeLayer(entry.polygon);
        shown.delete(id);
      }
    }
    for (const zone of zones) {
      const outlineKey = JSON.stringify(zone.outline);
      const selected = zone.id === selectedId;
      const existing = shown.get(zone.id);
      if (existing && existing.outlineKey === outlineKey) {
        existing.zone = zone;
        existing.polygon.setStyle(styleOf(zone, selected));
        existing.polygon.setTooltipContent(describe(zone));
        decorate(existing);
        if (selected) existing.polygon.bringToFront();
        continue;
      }
      if (existing) group.removeLayer(existing.polygon);
      // Outline in map metres [x, y]; Leaflet's LatLng here is (lat = y, lng = x).
      const polygon = L.polygon(
        zone.outline.map(([x, y]) => L.latLng(y, x)),
        styleOf(zone, selected),
      );
      const entry = { polygon, zone, outlineKey };
      shown.set(zone.id, entry);
      polygon.bindTooltip(describe(zone), { sticky: true, direction: 'top', offset: L.point(0, -8), className: 'dl-map-tooltip' });
      polygon.on('click', (event) => open(entry.zone.id, event));
      // The SVG element exists only while the layer is on a map; label it each time it is added.
      polygon.on('add', () => {
        decorate(entry);
        polygon.getElement()?.addEventListener('keydown', (event) => {
          const key = (event as KeyboardEvent).key;
          if (key === 'Enter' || key === ' ') {
            event.preventDefault();
            open(entry.zone.id);
          }
        });
      });
      group.addLayer(polygon);
      if (selected) polygon.bringToFront();
    }
  }

  return { group, update };
}
