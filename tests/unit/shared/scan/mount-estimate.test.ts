import { describe, expect, it } from 'vitest';
import { distanceTransform } from '../../../../shared/grid/distance-transform.js';
import { gridFrameToWorld } from '../../../../shared/grid/transform.js';
import { estimateMountError, type MountSamples } from '../../../../shared/scan/mount-estimate.js';
import { createRng } from '../../../../shared/sim/random.js';
import type { GridGeometry } from '../../../../shared/types/grid.js';

const DEG = Math.PI / 180;
const RESOLUTION = 0.05; // metres per cell, the usual map resolution (common practice)

/** A wall segment in the map frame, metres. */
type Segment = [number, number, number, number];

/**
 * A hand-made rectangular room (invented test scene): walls one cell thick along cell centres of
 * columns/rows 10 and 250 × 10 and 170 (12 m × 8 m), plus a 2 m × 1 m rack block, on a grid whose
 * origin is turned by `yaw`. Returns the grid's wall mask and the true wall centre lines in metres.
 */
function makeRoom(yaw: number) {
  const width = 261;
  const height = 181;
  const geometry: GridGeometry = { width, height, resolution: RESOLUTION, origin: { x: -2, y: 1.5, yaw } };
  const mask = new Uint8Array(width * height);
  const boxes = [
    [10, 10, 250, 170],
    [150, 60, 190, 80],
  ];
  const segments: Segment[] = [];
  for (const [i0, j0, i1, j1] of boxes) {
    for (let i = i0; i <= i1; i++) {
      mask[j0 * width + i] = 1;
      mask[j1 * width + i] = 1;
    }
    for (let j = j0; j <= j1; j++) {
      mask[j * width + i0] = 1;
      mask[j * width + i1] = 1;
    }
    // Cell centres of the wall cells: (i + 0.5, j + 0.5) in continuous cell coordinates.
    const corners = [
      [i0, j0],
      [i1, j0],
      [i1, j1],
      [i0, j1],
    ].map(([i, j]) => gridFrameToWorld(geometry, i + 0.5, j + 0.5));
    for (let c = 0; c < 4; c++) {
      const a = corners[c];
      const b = corners[(c + 1) % 4];
      segments.push([a.x, a.y, b.x, b.y]);
    }
  }
  return { geometry, mask, segments };
}

/** Distance along the ray (ox, oy) + t (dx, dy) to the nearest segment, or Infinity. */
function castRay(ox: number, oy: number, dx: number, dy: number, segments: Segment[]): number {
  let best = Infinity;
  for (const [ax, ay, bx, by] of segments) {
    const ex = bx - ax;
    const ey = by - ay;
    const denom = dx * ey - dy * ex;
    if (Math.abs(denom) < 1e-12) continue;
    const t = ((ax - ox) * ey - (ay - oy) * ex) / denom;
    const s = ((ax - ox) * dy - (ay - oy) * dx) / denom;
    if (t > 1e-9 && s >= 0 && s <= 1 && t < best) best = t;
  }
  return best;
}

/**
 * Simulates returns of a scanner whose true mount differs from the configured one by `error`:
 * each reported scanner pose (room-frame x, y in metres and yaw) is seen through pose ∘ error, beams over
 * ±120° every 1°, range noise N(0, 1 cm). Returns the samples and how many hit the `extra` segments.
 */
function simulate(
  segments: Segment[],
  extra: Segment[],
  toMap: (x: number, y: number) => { x: number; y: number },
  mapYaw: number,
  error: { dx: number; dy: number; dyaw: number },
  seed: number,
) {
  const rng = createRng(seed);
  const reported = [
    [2, 2, 0],
    [6, 4, 90],
    [9, 2.5, 200],
    [3, 6, 300],
    [10.5, 6.5, 135],
    [5, 1.5, 45],
    [7.5, 6.8, 250],
    [1.5, 4, 170],
  ];
  const poses: number[] = [];
  const scanOf: number[] = [];
  const points: number[] = [];
  let extraHits = 0;
  reported.forEach(([rx, ry, rdeg], s) => {
    // Reported scanner pose in the map frame (the room is laid out in the grid's own axes).
    const p = toMap(rx, ry);
    const yaw = rdeg * DEG + mapYaw;
    poses.push(p.x, p.y, yaw);
    // True scanner pose = reported ∘ error.
    const tx = p.x + Math.cos(yaw) * error.dx - Math.sin(yaw) * error.dy;
    const ty = p.y + Math.sin(yaw) * error.dx + Math.cos(yaw) * error.dy;
    const tyaw = yaw + error.dyaw;
    for (let b = -120; b <= 120; b++) {
      const bearing = b * DEG;
      const dirX = Math.cos(tyaw + bearing);
      const dirY = Math.sin(tyaw + bearing);
      const mapped = castRay(tx, ty, dirX, dirY, segments);
      const added = castRay(tx, ty, dirX, dirY, extra);
      const range = Math.min(mapped, added);
      if (!(range < 20)) continue;
      if (added < mapped) extraHits++;
      const measured = range + rng.gaussian(0.01);
      scanOf.push(s);
      points.push(measured * Math.cos(bearing), measured * Math.sin(bearing));
    }
  });
  const samples: MountSamples = { poses: Float64Array.from(poses), scanOf: Uint32Array.from(scanOf), points: Float64Array.from(points) };
  return { samples, extraHits };
}

function roomCase(yaw: number) {
  const room = makeRoom(yaw);
  const field = distanceTransform(room.mask, room.geometry.width, room.geometry.height);
  // Room coordinates in metres measured from the room's lower-left wall centre line, along the grid axes.
  const toMap = (x: number, y: number) => gridFrameToWorld(room.geometry, 10.5 + x / RESOLUTION, 10.5 + y / RESOLUTION);
  return { ...room, field, toMap };
}

describe('scanner mount estimate', () => {
  it('when the mount is turned by 1.4° and shifted 3 cm, then the estimate recovers both within tolerance', () => {
    // Arrange
    const { field, geometry, segments, toMap } = roomCase(0);
    const truth = { dx: 0.03, dy: 0, dyaw: 1.4 * DEG };
    const { samples } = simulate(segments, [], toMap, 0, truth, 1);
    // Act
    const estimate = estimateMountError(field, geometry, samples);
    // Assert
    expect(estimate.converged).toBe(true);
    expect(Math.abs(estimate.dx - truth.dx)).toBeLessThan(0.003);
    expect(Math.abs(estimate.dy - truth.dy)).toBeLessThan(0.003);
    expect(Math.abs(estimate.dyaw - truth.dyaw) / DEG).toBeLessThan(0.03);
    // Reported uncertainty is small enough to say "turned by 1.4° (±0.1°)".
    expect(estimate.sigma.dyaw / DEG).toBeGreaterThan(0);
    expect(estimate.sigma.dyaw / DEG).toBeLessThan(0.1);
    expect(estimate.sigma.dx).toBeLessThan(0.005);
    expect(estimate.inliers).toBeGreaterThan(0.9 * samples.scanOf.length);
  });

  it('when the grid origin is turned and the mount error points the other way, then the estimate still recovers it', () => {
    // Arrange: a 0.4 rad origin yaw exercises the grid-frame rotation of positions and gradients.
    const { field, geometry, segments, toMap } = roomCase(0.4);
    const truth = { dx: -0.02, dy: 0.025, dyaw: -1.1 * DEG };
    const { samples } = simulate(segments, [], toMap, 0.4, truth, 2);
    // Act
    const estimate = estimateMountError(field, geometry, samples);
    // Assert
    expect(Math.abs(estimate.dx - truth.dx)).toBeLessThan(0.003);
    expect(Math.abs(estimate.dy - truth.dy)).toBeLessThan(0.003);
    expect(Math.abs(estimate.dyaw - truth.dyaw) / DEG).toBeLessThan(0.03);
  });

  it('when a fifth of the returns hit a new wall in front of a mapped one, then the robust fit still recovers the mount while plain least squares is pulled off', () => {
    // Arrange: a new partition 0.25 m in front of the east wall, inside the 0.5 m cutoff, so the
    // returns off it are not simply dropped by distance (invented scene).
    const { field, geometry, segments, toMap } = roomCase(0);
    const a = toMap(11.75, 0.2);
    const b = toMap(11.75, 7.8);
    const c = toMap(0.25, 0.2);
    const d = toMap(0.25, 3.5);
    const extra: Segment[] = [
      [a.x, a.y, b.x, b.y],
      [c.x, c.y, d.x, d.y],
    ];
    const truth = { dx: 0.03, dy: 0, dyaw: 1.4 * DEG };
    const { samples, extraHits } = simulate(segments, extra, toMap, 0, truth, 3);
    // Act
    const robust = estimateMountError(field, geometry, samples);
    const plain = estimateMountError(field, geometry, samples, { loss: 'squared' });
    // Assert: the scene really has about 20 % outliers.
    const share = extraHits / samples.scanOf.length;
    expect(share).toBeGreaterThan(0.17);
    expect(share).toBeLessThan(0.3);
    expect(Math.abs(robust.dx - truth.dx)).toBeLessThan(0.003);
    expect(Math.abs(robust.dy - truth.dy)).toBeLessThan(0.003);
    expect(Math.abs(robust.dyaw - truth.dyaw) / DEG).toBeLessThan(0.03);
    expect(robust.inliers).toBeLessThan(0.9 * samples.scanOf.length);
    const plainError = Math.max(Math.abs(plain.dx - truth.dx), Math.abs(plain.dy - truth.dy));
    expect(plainError).toBeGreaterThan(0.01);
  });

  it('when the mount is right, then the estimate is about zero', () => {
    // Arrange
    const { field, geometry, segments, toMap } = roomCase(0);
    const { samples } = simulate(segments, [], toMap, 0, { dx: 0, dy: 0, dyaw: 0 }, 4);
    // Act
    const estimate = estimateMountError(field, geometry, samples);
    // Assert
    expect(Math.abs(estimate.dx)).toBeLessThan(0.002);
    expect(Math.abs(estimate.dy)).toBeLessThan(0.002);
    expect(Math.abs(estimate.dyaw) / DEG).toBeLessThan(0.02);
    // Within a few reported standard deviations of the truth, i.e. the σ is not wildly optimistic.
    expect(Math.abs(estimate.dyaw)).toBeLessThan(5 * estimate.sigma.dyaw + 0.005 * DEG);
  });

  it('when every return lies on one straight wall, then a RangeError says the mount is not pinned down', () => {
    // Arrange: two points per scan on the south wall only, seen from one pose.
    const { field, geometry, toMap } = roomCase(0);
    const p = toMap(6, 2);
    const points: number[] = [];
    for (let x = -3; x <= 3; x += 0.25) points.push(x, -2);
    const samples: MountSamples = {
      poses: Float64Array.of(p.x, p.y, 0),
      scanOf: new Uint32Array(points.length / 2),
      points: Float64Array.from(points),
    };
    // Act + Assert
    expect(() => estimateMountError(field, geometry, samples)).toThrow(/do not pin down/);
  });

  it('when samples are malformed, then a RangeError explains which part', () => {
    const { field, geometry } = roomCase(0);
    const samples: MountSamples = { poses: Float64Array.of(1, 1, 0), scanOf: Uint32Array.of(0, 1), points: new Float64Array(4) };
    expect(() => estimateMountError(field, geometry, samples)).toThrow(/only 1 scans/);
    expect(() => estimateMountError(field, { ...geometry, width: 3 }, samples)).toThrow(/distance field/);
  });
});
