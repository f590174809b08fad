import { describe, expect, it } from 'vitest';
import { imageToGrid, gridToImage } from '../../../../shared/grid/image-to-grid.js';
import { RESOLUTION_BOUNDS } from '../../../../shared/grid/map-kinds.js';
import { chargerStationModel } from '../../../../shared/sim/station-model.js';
import { CellState } from '../../../../shared/types/grid.js';

const stateAt = (m: ReturnType<typeof chargerStationModel>, x: number, y: number) => {
  const { grid } = m;
  const i = Math.floor((x - grid.origin.x) / grid.resolution);
  const j = Math.floor((y - grid.origin.y) / grid.resolution);
  return grid.cells[j * grid.width + i];
};

describe('invented charging-station model', () => {
  it('when made at 5 mm, then it is 160 × 120 cells at a station resolution with its origin at the lower-left corner', () => {
    const m = chargerStationModel();
    expect([m.grid.width, m.grid.height, m.grid.resolution]).toEqual([160, 120, 0.005]);
    const [lo, hi] = RESOLUTION_BOUNDS.station;
    expect(m.grid.resolution).toBeGreaterThanOrEqual(lo);
    expect(m.grid.resolution).toBeLessThanOrEqual(hi);
    expect(m.metadata.origin).toEqual([-0.4, -0.3, 0]);
  });

  it('when looked at, then the docking point is free, the pads and wall are structure and the housing inside is unknown', () => {
    const m = chargerStationModel();
    expect(stateAt(m, 0, 0)).toBe(CellState.Free);
    expect(stateAt(m, 0.17, 0.045)).toBe(CellState.Occupied);
    expect(stateAt(m, 0.17, 0)).toBe(CellState.Free);
    expect(stateAt(m, 0.31, 0)).toBe(CellState.Occupied);
    expect(stateAt(m, 0.24, 0)).toBe(CellState.Unknown);
    expect(stateAt(m, 0.37, 0.25)).toBe(CellState.Unknown);
    // With the funnel the rail crosses (0.10, ±0.21); without it that point is free.
    expect(stateAt(m, 0.1, 0.21)).toBe(CellState.Occupied);
    expect(stateAt(chargerStationModel({ funnel: false }), 0.1, 0.21)).toBe(CellState.Free);
  });

  it('when written as a PGM image and read back with its metadata, then every cell keeps its state', () => {
    const m = chargerStationModel({ bodyWidthM: 0.26 });
    const back = imageToGrid(gridToImage(m.grid), m.metadata);
    expect(Array.from(back.cells)).toEqual(Array.from(m.grid.cells));
  });
});
