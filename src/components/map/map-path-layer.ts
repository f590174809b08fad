import * as L from 'leaflet';
import type { RobotPaths } from '@/api/paths.api';
import { robotShade } from './map-scales';

/** The robot paths layer: its Leaflet group and how to show new paths. */
export interface PathLayer {
  group: L.LayerGroup;
  update: (paths: RobotPaths | null) => void;
}

/**
 * Returns the layer of robot paths: one thin polyline per robot (its tracks as parts) in an ink
 * shade of its own, on a canvas renderer (a day of driving is thousands of points), with the
 * robot's name as a tooltip on hover.
 */
export function createPathLayer(options: { pane: string }): PathLayer {
  const renderer = L.canvas({ pane: options.pane, tolerance: 5 });
  const group = L.layerGroup();

  function update(paths: RobotPaths | null): void {
    group.clearLayers();
    if (!paths) return;
    paths.robots.forEach((robot, k) => {
      const tracks = robot.tracks.filter((t) => t.length > 1).map((t) => t.map(([x, y]) => L.latLng(y, x)));
      if (tracks.length === 0) return;
      L.polyline(tracks, { renderer, pane: options.pane, color: robotShade(k), weight: 1.6, opacity: 0.85, lineJoin: 'round', interactive: true })
        .bindTooltip(robot.name, { sticky: true, direction: 'top', offset: L.point(0, -6), className: 'dl-map-tooltip' })
        .addTo(group);
    });
  }

  return { group, update };
}
