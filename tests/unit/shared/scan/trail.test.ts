import { describe, expect, it } from 'vitest';
import { decodeTrail, encodeTrail, simplifyTrack, splitTracks, TrailThinner } from '../../../../shared/scan/trail.js';

const T0 = Date.UTC(2026, 10, 3, 8, 0, 0);

describe('trail thinning', () => {
  it('when a robot drives 10 m in 0.1 m steps at 10 scans a second, then a pose is kept each metre', () => {
    const thinner = new TrailThinner({ minStepM: 1, heartbeatMs: 30_000 });
    for (let k = 0; k <= 100; k++) thinner.add(T0 + 100 * k, 0.1 * k, 0);
    // Floating-point steps of 0.1 reach 1 m on the 10th or 11th step; either keeps 10 or 11 poses.
    expect(thinner.points.x.length).toBeGreaterThanOrEqual(10);
    expect(thinner.points.x.length).toBeLessThanOrEqual(11);
    for (let k = 1; k < thinner.points.x.length; k++) expect(thinner.points.x[k] - thinner.points.x[k - 1]).toBeGreaterThanOrEqual(1 - 1e-9);
  });

  it('when a robot stands for two minutes, then a pose is kept every heartbeat', () => {
    const thinner = new TrailThinner({ minStepM: 1, heartbeatMs: 30_000 });
    for (let s = 0; s <= 120; s++) thinner.add(T0 + 1000 * s, 4, 2);
    expect(thinner.points.t.map((t) => (t - T0) / 1000)).toEqual([0, 30, 60, 90, 120]);
  });
});

describe('splitting trails into tracks', () => {
  it('when poses arrive out of order with a 5-minute gap and a 12 m jump, then three tracks come back in time order', () => {
    const points = {
      t: [T0 + 2000, T0, T0 + 1000, T0 + 302_000, T0 + 303_000, T0 + 304_000, T0 + 305_000],
      x: [2, 0, 1, 3, 4, 16, 17],
      y: [0, 0, 0, 0, 0, 0, 0],
    };
    expect(splitTracks(points, { maxGapMs: 60_000, maxJumpM: 5 })).toEqual([
      [[0, 0], [1, 0], [2, 0]],
      [[3, 0], [4, 0]],
      [[16, 0], [17, 0]],
    ]);
  });

  it('when a track would hold a single pose, then it is dropped', () => {
    expect(splitTracks({ t: [T0, T0 + 600_000], x: [0, 1], y: [0, 0] })).toEqual([]);
  });
});

describe('packed trails', () => {
  it('when poses are packed and read back, then times are exact and positions within float32 precision', () => {
    const points = { t: [T0, T0 + 123], x: [12.345, -3.5], y: [0.01, 250.75] };
    const back = decodeTrail(encodeTrail(points));
    expect(back.t).toEqual(points.t);
    back.x.forEach((x, k) => expect(x).toBeCloseTo(points.x[k], 5));
    back.y.forEach((y, k) => expect(y).toBeCloseTo(points.y[k], 4));
  });

  it('when the bytes are not whole poses, then reading refuses them', () => {
    expect(() => decodeTrail(new Uint8Array(17))).toThrow(/multiple of 16 bytes/);
  });
});

describe('simplifying tracks (Ramer 1972; Douglas & Peucker 1973)', () => {
  it('when an L-shaped drive wobbles by 5 cm, then with a 0.25 m tolerance only its ends and the corner remain (worked by hand)', () => {
    // Chord (0,0)–(2,3): distances |3x − 2y| / √13 are 0.80, 1.66, 1.11, 0.60 → the corner (2,0) is kept;
    // then (1,0.05) lies 0.05 m from (0,0)–(2,0) and (2,1), (2.05,2) lie 0 and 0.05 m from (2,0)–(2,3): dropped.
    const track: Array<[number, number]> = [[0, 0], [1, 0.05], [2, 0], [2, 1], [2.05, 2], [2, 3]];
    expect(simplifyTrack(track, 0.25)).toEqual([[0, 0], [2, 0], [2, 3]]);
  });

  it('when every pose lies farther than the tolerance from the chords, then every pose stays', () => {
    const zigzag: Array<[number, number]> = [[0, 0], [1, 1], [2, 0], [3, 1], [4, 0]];
    expect(simplifyTrack(zigzag, 0.25)).toEqual(zigzag);
  });

  it('when a day-long loop of 50,000 poses is simplified, then it runs without deep recursion and keeps the corners', () => {
    const square: Array<[number, number]> = [];
    for (let k = 0; k < 50_000; k++) {
      const s = (k * 0.1) % 40; // a 10 m square, 0.1 m a pose
      const side = Math.floor(s / 10);
      const u = s % 10;
      square.push(side === 0 ? [u, 0] : side === 1 ? [10, u] : side === 2 ? [10 - u, 10] : [0, 10 - u]);
    }
    const simple = simplifyTrack(square, 0.25);
    expect(simple.length).toBeLessThan(3000);
    for (const p of simple) expect(p[0] === 0 || p[0] === 10 || p[1] === 0 || p[1] === 10).toBe(true);
  });
});
