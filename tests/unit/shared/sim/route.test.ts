import { describe, expect, it } from 'vitest';
import { createRoute, poseOnRoute } from '../../../../shared/sim/route.js';

// A 4 m × 2 m rectangle driven counter-clockwise; the loop is 12 m long (worked by hand).
const loop = createRoute([
  [0, 0],
  [4, 0],
  [4, 2],
  [0, 2],
]);

describe('poseOnRoute', () => {
  it('when measuring the loop, then its length is the rectangle perimeter', () => {
    expect(loop.length).toBe(12);
    expect(Array.from(loop.cumulative)).toEqual([0, 4, 6, 10, 12]);
  });

  it('when asking for poses along each leg, then position and heading follow the leg', () => {
    expect(poseOnRoute(loop, 1)).toEqual([1, 0, 0]);
    expect(poseOnRoute(loop, 5)).toEqual([4, 1, Math.PI / 2]);
    expect(poseOnRoute(loop, 8)).toEqual([2, 2, Math.PI]);
    expect(poseOnRoute(loop, 11)).toEqual([0, 1, -Math.PI / 2]);
  });

  it('when the distance exceeds the loop or is negative, then it wraps around', () => {
    expect(poseOnRoute(loop, 13)).toEqual(poseOnRoute(loop, 1));
    expect(poseOnRoute(loop, -1)).toEqual(poseOnRoute(loop, 11));
  });

  it('when the waypoints do not make a loop, then creating the route fails with a clear message', () => {
    expect(() => createRoute([[1, 1]])).toThrow(/at least two distinct waypoints/);
    expect(() => createRoute([[1, 1], [1, 1]])).toThrow(/at least two distinct waypoints/);
  });
});
