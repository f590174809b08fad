import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { createRng } from '../../../../shared/sim/random.js';
import { beamTable, castScan, safetyScannerModel } from '../../../../shared/sim/scanner.js';
import { createSnapshot } from '../../../../shared/sim/traffic.js';
import { StaticWorld } from '../../../../shared/sim/world-index.js';

// A straight wall whose face is the line x = 5, long enough to cover the whole field.
const wall = new StaticWorld([{ minX: 5, minY: -100, maxX: 5.3, maxY: 100, dropout: 0 }]);

describe('safetyScannerModel', () => {
  it('when built with the default figures, then it has 541 beams over 270° at 0.5° and 0.05–30 m', () => {
    // 270° / 0.5° = 540 steps → 541 beams (typical safety-laser figures, common practice, from memory).
    const m = safetyScannerModel();
    expect(m.beams).toBe(541);
    expect(m.angleMin).toBeCloseTo((-135 * Math.PI) / 180, 12);
    expect(m.angleMin + (m.beams - 1) * m.angleIncrement).toBeCloseTo((135 * Math.PI) / 180, 12);
    expect([m.rangeMin, m.rangeMax]).toEqual([0.05, 30]);
  });

  it('when decimating by 4, then the beams span the same field at 2°', () => {
    const m = safetyScannerModel(4);
    expect(m.beams).toBe(136);
    expect(m.angleIncrement).toBeCloseTo((2 * Math.PI) / 180, 12);
    expect(() => safetyScannerModel(0)).toThrow(/beamStep/);
  });
});

describe('castScan', () => {
  it('when a noise-free scanner at the origin faces a wall 5 m ahead, then each beam reads 5 / cos(bearing) or no return past 30 m', () => {
    // Arrange: right-triangle geometry; a beam at bearing a reaches the line x = 5 after 5 / cos a,
    // which exceeds 30 m once |a| > acos(5/30) ≈ 80.4°; beams pointing backwards never reach it.
    const model = safetyScannerModel();
    const out = new Float64Array(model.beams);

    // Act
    castScan(wall, null, 0, 0, 0, model, beamTable(model), null, out);

    // Assert
    for (let k = 0; k < model.beams; k++) {
      const a = model.angleMin + k * model.angleIncrement;
      const expected = Math.cos(a) > 0 ? 5 / Math.cos(a) : Infinity;
      if (expected < 30) expect(out[k]).toBeCloseTo(expected, 9);
      else expect(out[k]).toBeNaN();
    }
    expect(out[270]).toBeCloseTo(5, 12);
  });

  it('when the scanner is turned by +90° and placed 2 m below a wall y = 3, then the middle beam reads 2 and the 45° beams 2·√2', () => {
    // Arrange: hand-placed scanner at (1, 1) heading +y; wall face y = 3.
    const world = new StaticWorld([{ minX: -100, minY: 3, maxX: 100, maxY: 3.2, dropout: 0 }]);
    const model = safetyScannerModel();
    const out = new Float64Array(model.beams);

    // Act
    castScan(world, null, 1, 1, Math.PI / 2, model, beamTable(model), null, out);

    // Assert: beam 270 is straight ahead; beams 180 and 360 are ±45°.
    expect(out[270]).toBeCloseTo(2, 12);
    expect(out[180]).toBeCloseTo(2 * Math.SQRT2, 12);
    expect(out[360]).toBeCloseTo(2 * Math.SQRT2, 12);
  });

  it('when a person (disc r = 0.3) stands 2 m ahead, then the middle beam reads 1.7 instead of the wall', () => {
    // Arrange
    const model = safetyScannerModel();
    const snap = createSnapshot(1, 0);
    snap.circles.set([2, 0, 0.3]);
    snap.circleCount = 1;
    const out = new Float64Array(model.beams);

    // Act
    castScan(wall, snap, 0, 0, 0, model, beamTable(model), null, out);

    // Assert
    expect(out[270]).toBeCloseTo(1.7, 12);
    expect(out[0]).toBeNaN();
  });

  it('when noise is on with σ = 15 mm, then range errors have mean 0 and standard deviation σ within their 99.9 % intervals', () => {
    // Arrange: the intervals use jstat@1.9.6 quantiles: mean within z·σ/√n, (n − 1)s²/σ² within
    // the χ²(n − 1) quantiles. No dropout so every beam in range returns.
    const model = safetyScannerModel(1, { rangeSigma: 0.015, dropout: 0 });
    const table = beamTable(model);
    const exact = new Float64Array(model.beams);
    castScan(wall, null, 0, 0, 0, model, table, null, exact);
    const rng = createRng(11);
    const out = new Float64Array(model.beams);
    const errors: number[] = [];

    // Act
    for (let scan = 0; scan < 100; scan++) {
      castScan(wall, null, 0, 0, 0, model, table, rng, out);
      for (let k = 0; k < model.beams; k++) if (!Number.isNaN(exact[k]) && exact[k] < 29) errors.push(out[k] - exact[k]);
    }

    // Assert
    const n = errors.length;
    const mean = errors.reduce((s, e) => s + e, 0) / n;
    const variance = errors.reduce((s, e) => s + (e - mean) ** 2, 0) / (n - 1);
    const z = jStat.normal.inv(0.9995, 0, 1);
    expect(n).toBeGreaterThan(10_000);
    expect(Math.abs(mean)).toBeLessThan((z * 0.015) / Math.sqrt(n));
    const stat = ((n - 1) * variance) / 0.015 ** 2;
    expect(stat).toBeGreaterThan(jStat.chisquare.inv(0.0005, n - 1));
    expect(stat).toBeLessThan(jStat.chisquare.inv(0.9995, n - 1));
  });

  it('when a dark surface drops 40 % of beams, then the share of no-returns matches within a 99.9 % binomial interval', () => {
    // Arrange: normal approximation of the binomial, p ± z·√(p(1 − p)/n) (z from jstat@1.9.6).
    const world = new StaticWorld([{ minX: 5, minY: -100, maxX: 5.3, maxY: 100, dropout: 0.4 }]);
    const model = safetyScannerModel(1, { rangeSigma: 0, dropout: 0 });
    const table = beamTable(model);
    const rng = createRng(12);
    const out = new Float64Array(model.beams);
    let lost = 0;
    let total = 0;

    // Act: beams within ±60° all reach the wall (5 / cos 60° = 10 m).
    for (let scan = 0; scan < 50; scan++) {
      castScan(world, null, 0, 0, 0, model, table, rng, out);
      for (let k = 150; k <= 390; k++) {
        total++;
        if (Number.isNaN(out[k])) lost++;
      }
    }

    // Assert
    const z = jStat.normal.inv(0.9995, 0, 1);
    expect(Math.abs(lost / total - 0.4)).toBeLessThan(z * Math.sqrt((0.4 * 0.6) / total));
  });
});
