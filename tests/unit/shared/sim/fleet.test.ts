import { describe, expect, it } from 'vitest';
import { buildFleet, defaultRobotOptions, routeWaypoints } from '../../../../shared/sim/fleet.js';
import { planChanges } from '../../../../shared/sim/changes.js';
import { buildWarehouse } from '../../../../shared/sim/warehouse.js';

describe('defaultRobotOptions', () => {
  it('when asking for three robots, then they are AMR-01 … AMR-03 and the third carries a rear scanner', () => {
    expect(defaultRobotOptions(3)).toEqual([
      { name: 'AMR-01', rearScanner: false },
      { name: 'AMR-02', rearScanner: false },
      { name: 'AMR-03', rearScanner: true },
    ]);
    expect(() => defaultRobotOptions(0)).toThrow(/1–20 robots/);
  });
});

describe('buildFleet', () => {
  it('when a mount error is given, then only the true mount moves and the configured mount stays', () => {
    // Arrange
    const layout = buildWarehouse();
    const yaw = (1.4 * Math.PI) / 180;

    // Act
    const fleet = buildFleet(layout, defaultRobotOptions(3), [{ robot: 'AMR-02', dyaw: yaw, dx: 0.03 }]);

    // Assert
    const r = fleet[1];
    expect(r.mounts[0]).toEqual({ name: 'front', x: 0.45, y: 0, yaw: 0 });
    expect(r.trueMounts[0].x).toBeCloseTo(0.48, 12);
    expect(r.trueMounts[0].yaw).toBe(yaw);
    expect(fleet[0].trueMounts).toEqual(fleet[0].mounts);
    expect(fleet[2].mounts.map((m) => m.name)).toEqual(['front', 'rear']);
  });

  it('when a mount error names an unknown robot or scanner, or names repeat, then building fails clearly', () => {
    const layout = buildWarehouse();
    expect(() => buildFleet(layout, defaultRobotOptions(2), [{ robot: 'AMR-09', dyaw: 0.01 }])).toThrow(/"AMR-09", which is not in the fleet/);
    expect(() => buildFleet(layout, defaultRobotOptions(2), [{ robot: 'AMR-01', scanner: 'rear' }])).toThrow(/does not carry/);
    expect(() => buildFleet(layout, [{ name: 'A' }, { name: 'A' }])).toThrow(/used twice/);
  });

  it('when robots drive their routes, then every route keeps at least 0.8 m from all structure on every day', () => {
    // Arrange: sample each leg every few centimetres and measure to every box (nearest box
    // point by clamping), on the day-0 building plus every scripted addition.
    const layout = buildWarehouse();
    const plan = planChanges(layout, 1, 28);
    const everything = [...layout.structure, ...plan.changes.flatMap((c) => c.boxes)];

    // Act
    let closest = Infinity;
    for (let index = 0; index < 6; index++) {
      const pts = routeWaypoints(layout, index);
      for (let k = 0; k < pts.length; k++) {
        const [ax, ay] = pts[k];
        const [bx, by] = pts[(k + 1) % pts.length];
        const steps = Math.ceil(Math.hypot(bx - ax, by - ay) / 0.05);
        for (let q = 0; q <= steps; q++) {
          const x = ax + ((bx - ax) * q) / steps;
          const y = ay + ((by - ay) * q) / steps;
          for (const b of everything) {
            const cx = Math.max(b.minX, Math.min(b.maxX, x));
            const cy = Math.max(b.minY, Math.min(b.maxY, y));
            closest = Math.min(closest, Math.hypot(x - cx, y - cy));
          }
        }
      }
    }

    // Assert
    expect(closest).toBeGreaterThanOrEqual(0.8);
  });
});
