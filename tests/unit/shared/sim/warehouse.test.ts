import { describe, expect, it } from 'vitest';
import { boxesOverlap } from '../../../../shared/sim/shapes.js';
import { buildWarehouse } from '../../../../shared/sim/warehouse.js';

// The building is invented demo data; expected figures below follow by hand from its stated
// dimensions (0.3 m walls, 2.2 m double racks, 3 m aisles, 2.7 m bays, 3 m doors every 5 m).
describe('buildWarehouse', () => {
  it('when built with defaults, then the outer walls enclose 60 m × 40 m with the dock doors on the south side', () => {
    // Arrange, Act
    const w = buildWarehouse();
    const byId = new Map(w.structure.map((s) => [s.id, s]));

    // Assert
    expect([w.width, w.depth]).toEqual([60, 40]);
    expect(byId.get('wall-north')).toMatchObject({ minX: 0, maxX: 60, minY: 39.7, maxY: 40 });
    expect(byId.get('wall-west')).toMatchObject({ minX: 0, maxX: 0.3 });
    expect(byId.get('wall-east')).toMatchObject({ minX: 59.7, maxX: 60 });
    const doors = w.structure.filter((s) => s.kind === 'dock-door');
    expect(doors.length).toBe(7);
    for (const d of doors) expect(d.maxY).toBeLessThan(0.3);
  });

  it('when built, then no two pieces of structure overlap except doors tucked into their wall openings', () => {
    // Arrange
    const w = buildWarehouse();

    // Act
    const clashes: string[] = [];
    for (let a = 0; a < w.structure.length; a++) {
      for (let b = a + 1; b < w.structure.length; b++) {
        if (boxesOverlap(w.structure[a], w.structure[b])) clashes.push(`${w.structure[a].id} × ${w.structure[b].id}`);
      }
    }

    // Assert
    expect(clashes).toEqual([]);
  });

  it('when built, then eight double rack rows stand with 3 m aisles between them and a cross aisle through the middle', () => {
    // Arrange, Act
    const w = buildWarehouse();

    // Assert
    expect(w.rackBays.length).toBe(8);
    for (let r = 1; r < w.rackBays.length; r++) expect(w.rackBays[r][0].minX - w.rackBays[r - 1][0].maxX).toBeCloseTo(3, 9);
    for (const row of w.rackBays) {
      for (const bay of row) {
        expect(bay.maxY - bay.minY).toBeCloseTo(2.7, 9);
        const inCross = bay.maxY > w.crossAisleY - 1.5 && bay.minY < w.crossAisleY + 1.5;
        expect(inCross).toBe(false);
      }
    }
    expect(w.aisleX.length).toBe(9);
  });

  it('when built larger, then more rack rows fit; when too small, then it fails with the minimum size', () => {
    expect(buildWarehouse({ width: 90, depth: 50 }).rackBays.length).toBeGreaterThan(8);
    expect(() => buildWarehouse({ width: 20, depth: 40 })).toThrow(/at least 36 m × 30 m/);
  });
});
