import { describe, expect, it } from 'vitest';
import { planChanges, structureOnDay, surfaceDropout } from '../../../../shared/sim/changes.js';
import { buildWarehouse } from '../../../../shared/sim/warehouse.js';

const layout = buildWarehouse();

describe('planChanges', () => {
  it('when planned with defaults over 28 days, then the four changes start on days 7, 12, (pallets from 3) and 18', () => {
    // Arrange, Act
    const plan = planChanges(layout, 42, 28);
    const byId = new Map(plan.changes.map((c) => [c.id, c]));

    // Assert
    expect(plan.changes.map((c) => [c.id, c.kind, c.persistence])).toEqual([
      ['missing-rack-bays', 'missing', 'persistent'],
      ['new-fence', 'new', 'persistent'],
      ['pallets-staging', 'new', 'intermittent'],
      ['unmapped-shelving', 'unmapped', 'persistent'],
    ]);
    expect(byId.get('missing-rack-bays')!.days[0]).toBe(7);
    expect(byId.get('missing-rack-bays')!.days.length).toBe(21);
    expect(byId.get('new-fence')!.days[0]).toBe(12);
    expect(byId.get('unmapped-shelving')!.days[0]).toBe(18);
    const pallets = byId.get('pallets-staging')!.days;
    expect(pallets[0]).toBeGreaterThanOrEqual(3);
    // Intermittent: some days on, some off, after the first.
    expect(pallets.length).toBeGreaterThan(3);
    expect(pallets.length).toBeLessThan(25 - 3);
    expect(plan.blanked.length).toBe(1);
  });

  it('when the same seed plans twice, then pallet days repeat; explicit days and null switch-offs are honoured', () => {
    // Arrange, Act
    const a = planChanges(layout, 5, 28);
    const b = planChanges(layout, 5, 28);
    const custom = planChanges(layout, 5, 10, { palletDays: [4, 2, 2, 30], missingFromDay: null, unmappedFromDay: null, fenceFromDay: 0 });

    // Assert
    expect(a).toEqual(b);
    expect(custom.changes.map((c) => [c.id, c.days])).toEqual([
      ['new-fence', [0, 1, 2, 3, 4, 5, 6, 7, 8, 9]],
      ['pallets-staging', [2, 4]],
    ]);
    expect(custom.blanked).toEqual([]);
    // The stored map's blanked patch does not depend on how many days are simulated.
    expect(planChanges(layout, 5, 3).blanked).toEqual(a.blanked);
  });

  it('when the change outline is asked for, then it is the counter-clockwise bounding rectangle of its boxes', () => {
    // Arrange
    const fence = planChanges(layout, 1, 28).changes.find((c) => c.id === 'new-fence')!;

    // Act, Assert
    const { minX, minY, maxX, maxY } = fence.bbox;
    expect(fence.polygon).toEqual([[minX, minY], [maxX, minY], [maxX, maxY], [minX, maxY]]);
    expect(maxX - minX).toBeCloseTo(6, 9);
    expect(surfaceDropout(fence.boxes[0])).toBeGreaterThan(0);
  });
});

describe('structureOnDay', () => {
  it('when a day is before, on and after the changes, then bays vanish and additions appear exactly from their first day', () => {
    // Arrange
    const plan = planChanges(layout, 42, 28, { palletDays: [9] });
    const ids = (day: number): Set<string> => new Set(structureOnDay(layout, plan, day).map((s) => s.id));
    const missing = plan.changes[0].boxes.map((b) => b.id);

    // Act
    const d6 = ids(6);
    const d7 = ids(7);
    const d9 = ids(9);
    const d10 = ids(10);
    const d18 = ids(18);

    // Assert
    for (const id of missing) {
      expect(d6.has(id)).toBe(true);
      expect(d7.has(id)).toBe(false);
    }
    expect(d9.has('pallet-1')).toBe(true);
    expect(d10.has('pallet-1')).toBe(false);
    expect(d10.has('fence-open-area')).toBe(false);
    expect(ids(12).has('fence-open-area')).toBe(true);
    expect(ids(17).has('shelving-blanked-area')).toBe(false);
    expect(d18.has('shelving-blanked-area')).toBe(true);
  });
});
