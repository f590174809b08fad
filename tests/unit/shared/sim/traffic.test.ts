import { describe, expect, it } from 'vitest';
import { createSnapshot, moverPosition, planTraffic, snapshotTraffic, type Mover } from '../../../../shared/sim/traffic.js';
import { buildWarehouse } from '../../../../shared/sim/warehouse.js';

const layout = buildWarehouse();
const DAY = 16 * 3600;

describe('moverPosition', () => {
  it('when a walker paces a 10 m stretch at 1 m/s, then it goes out and back and is absent outside its window', () => {
    // Arrange: worked by hand; the walk folds at 10 m.
    const m: Mover = { x0: 0, y0: 0, x1: 10, y1: 0, speed: 1, phase: 2, from: 100, to: 200 };

    // Act, Assert
    expect(moverPosition(m, 100)).toEqual([2, 0]);
    expect(moverPosition(m, 106)).toEqual([8, 0]);
    expect(moverPosition(m, 112)).toEqual([6, 0]);
    expect(moverPosition(m, 99)).toBeNull();
    expect(moverPosition(m, 201)).toBeNull();
  });
});

describe('planTraffic', () => {
  it('when the same day is planned twice, then the traffic repeats; another day differs', () => {
    expect(planTraffic(layout, 3, 4, DAY)).toEqual(planTraffic(layout, 3, 4, DAY));
    expect(planTraffic(layout, 3, 5, DAY)).not.toEqual(planTraffic(layout, 3, 4, DAY));
  });

  it('when people walk over 28 days, then no square metre holds a person at the same clock time on more than a quarter of the days', () => {
    // Arrange: sample every 10 minutes of the working day; bin positions into 1 m squares and
    // count on how many days each (time, square) pair was occupied.
    const days = 28;
    const seen = new Map<string, Set<number>>();

    // Act
    for (let day = 0; day < days; day++) {
      const t = planTraffic(layout, 17, day, DAY);
      for (let s = 0; s < DAY; s += 600) {
        for (const p of t.people) {
          const pos = moverPosition(p, s);
          if (!pos) continue;
          const key = `${s}:${Math.floor(pos[0])}:${Math.floor(pos[1])}`;
          if (!seen.has(key)) seen.set(key, new Set());
          seen.get(key)!.add(day);
        }
      }
    }

    // Assert
    const worst = Math.max(...[...seen.values()].map((d) => d.size));
    expect(seen.size).toBeGreaterThan(100);
    expect(worst).toBeLessThanOrEqual(days / 4);
  });

  it('when people walk, then they stay inside the building and off the rack bays', () => {
    // Arrange
    const t = planTraffic(layout, 23, 2, DAY);
    const bays = layout.rackBays.flat();

    // Act: a person's disc (0.3 m) must never overlap a rack bay at any sampled time.
    let clearance = Infinity;
    let minX = Infinity;
    let maxX = -Infinity;
    for (const p of t.people) {
      for (let s = p.from; s <= p.to; s += 30) {
        const [x, y] = moverPosition(p, s)!;
        minX = Math.min(minX, x);
        maxX = Math.max(maxX, x);
        for (const b of bays) {
          const cx = Math.max(b.minX, Math.min(b.maxX, x));
          const cy = Math.max(b.minY, Math.min(b.maxY, y));
          clearance = Math.min(clearance, Math.hypot(x - cx, y - cy));
        }
      }
    }

    // Assert
    expect(clearance).toBeGreaterThan(t.personRadius);
    expect(minX).toBeGreaterThan(0.6);
    expect(maxX).toBeLessThan(59.4);
  });
});

describe('snapshotTraffic', () => {
  it('when a forklift drives along x, then its footprint is 2.5 m long in x and 1.2 m wide in y around its position', () => {
    // Arrange
    const forklift: Mover = { x0: 4, y0: 4.5, x1: 20, y1: 4.5, speed: 2, phase: 0, from: 0, to: 100 };
    const t = { people: [], personRadius: 0.3, forklift, forkliftLength: 2.5, forkliftWidth: 1.2 };

    // Act
    const snap = snapshotTraffic(t, 3, createSnapshot(0, 1));

    // Assert: at t = 3 s it has covered 6 m → centre (10, 4.5).
    expect(snap.boxCount).toBe(1);
    expect(Array.from(snap.boxes.subarray(0, 4))).toEqual([8.75, 3.9, 11.25, 5.1]);
    expect(snapshotTraffic(t, 101, snap).boxCount).toBe(0);
  });
});
