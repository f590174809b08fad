import { describe, expect, it } from 'vitest';
import { planChanges } from '../../../../shared/sim/changes.js';
import { gridGeometryFor, rasterizeMappingRun } from '../../../../shared/sim/stored-map.js';
import { buildWarehouse } from '../../../../shared/sim/warehouse.js';
import { CellState, type OccupancyGrid } from '../../../../shared/types/grid.js';

const { Free: F, Occupied: O, Unknown: U } = CellState;

/** State of the cell holding map point (x, y) metres, for a yaw-0 grid. */
function stateAt(grid: OccupancyGrid, x: number, y: number): number {
  const i = Math.floor((x - grid.origin.x) / grid.resolution);
  const j = Math.floor((y - grid.origin.y) / grid.resolution);
  return grid.cells[j * grid.width + i];
}

describe('gridGeometryFor', () => {
  it('when covering 60 m × 40 m at 5 cm with a 1 m margin, then the grid is 1240 × 840 cells from (−1, −1)', () => {
    expect(gridGeometryFor({ minX: 0, minY: 0, maxX: 60, maxY: 40 }, 0.05, 1)).toEqual({
      width: 1240,
      height: 840,
      resolution: 0.05,
      origin: { x: -1, y: -1, yaw: 0 },
    });
  });
});

describe('rasterizeMappingRun', () => {
  it('when a 1 m × 0.5 m room with 0.1 m walls is mapped at 0.1 m, then every cell matches the hand-drawn grid', () => {
    // Arrange: walls are the cells x ∈ [0, 0.1) ∪ [0.9, 1.0), y ∈ [0, 0.1) ∪ [0.4, 0.5); a
    // pillar fills the cell (0.5, 0.2); the grid has one cell of margin all round.
    const geometry = gridGeometryFor({ minX: 0, minY: 0, maxX: 1, maxY: 0.5 }, 0.1, 0.1);
    const structure = [
      { minX: 0, minY: 0, maxX: 1, maxY: 0.1 },
      { minX: 0, minY: 0.4, maxX: 1, maxY: 0.5 },
      { minX: 0, minY: 0, maxX: 0.1, maxY: 0.5 },
      { minX: 0.9, minY: 0, maxX: 1, maxY: 0.5 },
      { minX: 0.5, minY: 0.2, maxX: 0.6, maxY: 0.3 },
    ];

    // Act
    const grid = rasterizeMappingRun(geometry, { structure, seeds: [[0.35, 0.25]] });

    // Assert: rows listed top (j = 6) to bottom (j = 0), as drawn by hand.
    const rows: number[][] = [];
    for (let j = grid.height - 1; j >= 0; j--) rows.push(Array.from(grid.cells.subarray(j * grid.width, (j + 1) * grid.width)));
    expect([grid.width, grid.height]).toEqual([12, 7]);
    expect(rows).toEqual([
      [U, U, U, U, U, U, U, U, U, U, U, U],
      [U, O, O, O, O, O, O, O, O, O, O, U],
      [U, O, F, F, F, F, F, F, F, F, O, U],
      [U, O, F, F, F, F, O, F, F, F, O, U],
      [U, O, F, F, F, F, F, F, F, F, O, U],
      [U, O, O, O, O, O, O, O, O, O, O, U],
      [U, U, U, U, U, U, U, U, U, U, U, U],
    ]);
    // Probability bytes read back like the map image: free 254 → 1, occupied 0 → 255, unknown 205 → 50.
    expect(grid.probability[0]).toBe(50);
    expect(grid.probability[1 * 12 + 1]).toBe(255);
    expect(grid.probability[2 * 12 + 2]).toBe(1);
  });

  it('when the invented warehouse is mapped, then hand-picked cells on walls, racks, aisles and outside have the right state', () => {
    // Arrange
    const layout = buildWarehouse();
    const plan = planChanges(layout, 1, 28);
    const geometry = gridGeometryFor({ minX: 0, minY: 0, maxX: 60, maxY: 40 }, 0.05, 1);

    // Act
    const grid = rasterizeMappingRun(geometry, { structure: layout.structure, seeds: [[2.15, 10]], blanked: plan.blanked });

    // Assert: inner faces of the walls (x = 0.3, 59.7; y = 39.7) are occupied, the wall's
    // far side and the outside unknown; the floor beside the walls is free.
    expect(stateAt(grid, 0.275, 20)).toBe(O);
    expect(stateAt(grid, 0.325, 20)).toBe(F);
    expect(stateAt(grid, 0.025, 20)).toBe(U);
    expect(stateAt(grid, -0.5, 20)).toBe(U);
    expect(stateAt(grid, 59.725, 20)).toBe(O);
    expect(stateAt(grid, 30, 39.725)).toBe(O);
    expect(stateAt(grid, 30, 39.675)).toBe(F);
    // A dock door's inner face at y = 0.1 is occupied; the wall between doors at y = 0.3.
    expect(stateAt(grid, 9.5, 0.075)).toBe(O);
    expect(stateAt(grid, 9.5, 0.125)).toBe(F);
    expect(stateAt(grid, 6, 0.275)).toBe(O);
    // Rack row 1 spans x ∈ [4.0, 6.2]: its faces are occupied, its inside unknown, the aisle free.
    const bay = layout.rackBays[0][0];
    const midY = (bay.minY + bay.maxY) / 2;
    expect(stateAt(grid, 4.025, midY)).toBe(O);
    expect(stateAt(grid, 6.175, midY)).toBe(O);
    expect(stateAt(grid, 5.1, midY)).toBe(U);
    expect(stateAt(grid, 3.975, midY)).toBe(F);
    expect(stateAt(grid, layout.aisleX[1], midY)).toBe(F);
    // The blanked patch of the open area is unknown although nothing stands there.
    const gap = plan.blanked[0];
    expect(stateAt(grid, (gap.minX + gap.maxX) / 2, (gap.minY + gap.maxY) / 2)).toBe(U);
    expect(stateAt(grid, gap.minX - 0.5, gap.minY)).toBe(F);
  });
});
