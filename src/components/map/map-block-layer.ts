import * as L from 'leaflet';
import { TILE_SIZE } from '../../../shared/render/tiles';
import type { GridGeometry } from '../../../shared/types/grid';
import { blockPixelRect, blocksInTile, type BlockGrid } from './map-blocks';

/** What a block layer draws: how the map is cut into blocks, and each block's colour (null = leave it transparent). */
export interface BlockPaint {
  blocks: BlockGrid;
  colourOf: (k: number) => string | null;
}

/** A block layer on the map: the Leaflet layer and how to give it new colours. */
export interface BlockLayer {
  layer: L.GridLayer;
  setPaint: (paint: BlockPaint | null) => void;
}

/**
 * Returns a layer that draws the agreement blocks (or any per-block value) on canvas tiles in the
 * browser, on the same tile pyramid as the server's grid tiles. The blocks arrive as one small JSON:
 * measured with curl on the demo server, GET /agreement?days=7 of Fennick Cross DC (62 m × 42 m,
 * 31 × 21 blocks of 2 m) is 8,729 bytes (3.3 kB gzipped); a 4000 × 4000-cell map at 5 cm has
 * 10,000 blocks, at most ~250 kB (some 25 bytes per block with returns). Colouring them here
 * costs no request per tile and zoom, heat and traffic share the one answer, and switching a layer
 * redraws at once; server-rendered heat tiles would repeat those numbers in hundreds of PNGs.
 * Blocks are in the grid frame like the tiles, so each one is an exact pixel rectangle even when
 * the map has a yaw.
 */
export function createBlockLayer(geom: GridGeometry, options: { pane: string; opacity: number; minZoom: number; maxZoom: number }): BlockLayer {
  const layer = new BlockGridLayer(geom, {
    pane: options.pane,
    opacity: options.opacity,
    tileSize: TILE_SIZE,
    minZoom: options.minZoom,
    maxZoom: options.maxZoom,
    noWrap: true,
    keepBuffer: 4,
    updateWhenZooming: false,
  });
  return {
    layer,
    setPaint(next) {
      layer.paint = next;
      layer.redraw();
    },
  };
}

/** A GridLayer whose tiles are canvases with the blocks painted on them. */
class BlockGridLayer extends L.GridLayer {
  paint: BlockPaint | null = null;
  private readonly geom: GridGeometry;

  constructor(geom: GridGeometry, options: L.GridLayerOptions) {
    super(options);
    this.geom = geom;
  }

  protected override createTile(coords: L.Coords): HTMLElement {
    const canvas = document.createElement('canvas');
    // Sharp block edges on high-density screens without letting a tile grow past 512² pixels.
    const ratio = Math.min(2, window.devicePixelRatio || 1);
    canvas.width = TILE_SIZE * ratio;
    canvas.height = TILE_SIZE * ratio;
    const ctx = canvas.getContext('2d');
    if (!this.paint || !ctx) return canvas;
    ctx.scale(ratio, ratio);
    const { blocks, colourOf } = this.paint;
    const geom = this.geom;
    const range = blocksInTile(geom, blocks, coords.z, coords.x, coords.y);
    const ox = coords.x * TILE_SIZE;
    const oy = coords.y * TILE_SIZE;
    for (let bj = range.bjMin; bj < range.bjMax; bj++) {
      for (let bi = range.biMin; bi < range.biMax; bi++) {
        const colour = colourOf(bj * blocks.cols + bi);
        if (!colour) continue;
        const r = blockPixelRect(geom, blocks, bi, bj, coords.z);
        // Round both edges the same way on every tile, so neighbouring blocks meet without a seam.
        const x0 = Math.round(r.x - ox);
        const y0 = Math.round(r.y - oy);
        ctx.fillStyle = colour;
        ctx.fillRect(x0, y0, Math.round(r.x + r.width - ox) - x0, Math.round(r.y + r.height - oy) - y0);
      }
    }
    return canvas;
  }
}
