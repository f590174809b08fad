import { describe, expect, it } from 'vitest';
import { createRng } from '../../../../shared/sim/random.js';
import { rayBoxDistance } from '../../../../shared/sim/shapes.js';
import { StaticWorld, type SolidBox } from '../../../../shared/sim/world-index.js';

function randomBoxes(seed: number, n: number): SolidBox[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => {
    const x = rng.range(0, 40);
    const y = rng.range(0, 30);
    return { minX: x, minY: y, maxX: x + rng.range(0.05, 4), maxY: y + rng.range(0.05, 4), dropout: 0 };
  });
}

describe('StaticWorld.cast', () => {
  it('when casting many random rays, then distance and hit box equal a brute-force test of every box', () => {
    // Arrange: the reference is the definition itself — the nearest slab-test hit over all
    // boxes (Kay & Kajiya 1986) — without the bucket grid (Amanatides & Woo 1987) walk.
    const boxes = randomBoxes(3, 120);
    const world = new StaticWorld(boxes);
    const rng = createRng(4);

    for (let k = 0; k < 3000; k++) {
      const ox = rng.range(-5, 45);
      const oy = rng.range(-5, 35);
      const a = rng.range(-Math.PI, Math.PI);
      const dx = Math.cos(a);
      const dy = Math.sin(a);
      let best = Infinity;
      for (const b of boxes) best = Math.min(best, rayBoxDistance(ox, oy, dx, dy, b.minX, b.minY, b.maxX, b.maxY));
      const expected = best <= 30 ? best : Infinity;

      // Act
      const d = world.cast(ox, oy, dx, dy, 30);

      // Assert
      expect(d).toBe(expected);
      if (d !== Infinity) {
        const b = boxes[world.lastHit];
        expect(rayBoxDistance(ox, oy, dx, dy, b.minX, b.minY, b.maxX, b.maxY)).toBe(d);
      } else {
        expect(world.lastHit).toBe(-1);
      }
    }
  });

  it('when rays run exactly along the axes, then the bucket walk still finds the nearest box', () => {
    // Arrange: walls 10 m away in each axis direction from (5, 5); hand-placed.
    const world = new StaticWorld([
      { minX: 15, minY: 0, maxX: 15.3, maxY: 10, dropout: 0 },
      { minX: -5.3, minY: 0, maxX: -5, maxY: 10, dropout: 0 },
      { minX: -5, minY: 15, maxX: 15, maxY: 15.3, dropout: 0 },
      { minX: -5, minY: -5.3, maxX: 15, maxY: -5, dropout: 0.2 },
    ]);

    // Act, Assert
    expect(world.cast(5, 5, 1, 0, 30)).toBe(10);
    expect(world.cast(5, 5, -1, 0, 30)).toBe(10);
    expect(world.cast(5, 5, 0, 1, 30)).toBe(10);
    expect(world.cast(5, 5, 0, -1, 30)).toBe(10);
    expect(world.dropout[world.lastHit]).toBeCloseTo(0.2, 6);
    expect(world.cast(5, 5, 1, 0, 9.9)).toBe(Infinity);
  });

  it('when asking whether points lie inside boxes, then only points inside or on a box answer true', () => {
    // Arrange
    const world = new StaticWorld([{ minX: 1, minY: 1, maxX: 3, maxY: 2, dropout: 0 }]);

    // Act, Assert
    expect(world.contains(2, 1.5)).toBe(true);
    expect(world.contains(1, 1)).toBe(true);
    expect(world.contains(0.9, 1.5)).toBe(false);
    expect(world.contains(100, 100)).toBe(false);
    expect(world.count).toBe(1);
  });

  it('when the world is empty, then every ray misses', () => {
    expect(new StaticWorld([]).cast(0, 0, 1, 0, 30)).toBe(Infinity);
  });
});
