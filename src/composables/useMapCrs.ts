import * as L from 'leaflet';
import { mapToPixel, pixelToMap } from '../../shared/render/crs';
import { pixelsPerCell, tilePyramid } from '../../shared/render/tiles';
import type { GridGeometry } from '../../shared/types/grid';

/** A map version's Leaflet set-up: its CRS and the zoom range of its server tiles. */
export interface MapCrs {
  crs: L.CRS;
  minZoom: number;
  maxZoom: number;
  /** The map's extent in LatLng (lat = y, lng = x, metres) around all four corners of the grid, for fitBounds. */
  bounds: L.LatLngBounds;
}

/**
 * Returns a raster CRS for one map version, built on L.CRS.Simple: a LatLng is a map-frame point
 * in metres (lat = y up, lng = x right) and zoom z is the server tile pyramid's zoom z
 * (shared/render/tiles.ts: zoom 0 fits the whole map in 2 × 2 tiles, each zoom doubles).
 * Leaflet's own transformation cannot rotate, so the map's yaw lives in the projection:
 * it turns a LatLng into zoom-0 pixels (rotate by −yaw about the origin, scale by 1/resolution
 * and the zoom-0 factor, flip y), and CRS.Simple's scale 2^z takes it on to zoom z.
 */
export function createMapCrs(geom: GridGeometry): MapCrs {
  const zoom0 = pixelsPerCell(geom, 0);
  const projection: L.Projection = {
    project: (latlng) => {
      const p = mapToPixel(geom, 0, latlng.lng, latlng.lat);
      return L.point(p.x, p.y);
    },
    unproject: (point) => {
      const p = L.point(point);
      const w = pixelToMap(geom, 0, p.x, p.y);
      return L.latLng(w.y, w.x);
    },
    bounds: L.bounds([0, 0], [geom.width * zoom0, geom.height * zoom0]),
  };
  const crs: L.CRS = L.Util.extend({}, L.CRS.Simple, {
    projection,
    // Identity: the projection already yields zoom-0 pixels with y down.
    transformation: new L.Transformation(1, 0, 1, 0),
  });
  // With yaw the grid's corners are not the extremes of x and y, so take all four.
  const w = geom.width * zoom0;
  const h = geom.height * zoom0;
  const corners = [L.point(0, 0), L.point(w, 0), L.point(0, h), L.point(w, h)].map((p) => projection.unproject(p));
  const { minZoom, maxZoom } = tilePyramid(geom);
  return { crs, minZoom, maxZoom, bounds: L.latLngBounds(corners) };
}
