import { describe, expect, it } from 'vitest';
import { remapPriority } from '../../../../shared/remap/priority.js';

describe('remap priority', () => {
  it('when two zones of severity 0.5 and 0.2 sit where traffic is three times the site mean, then the score is 0.7 · 0.6 + 0.3 · 0.75', () => {
    // Hand-computed from the module's rule (a product choice): noisy-or 1 − 0.5 · 0.8 = 0.6;
    // area-weighted traffic (30·2 + 30·2) / 4 = 30 against 10 → 30 / 40 = 0.75; 0.42 + 0.225 = 0.645.
    const p = remapPriority([{ severity: 0.5, areaM2: 2, trafficPerM2PerDay: 30 }, { severity: 0.2, areaM2: 2, trafficPerM2PerDay: 30 }], 10);
    expect(p.score).toBeCloseTo(0.645, 12);
    expect(p.label).toBe('high');
  });

  it('when a weak zone lies in a quiet corner, then it is low; no zones at all is low with score 0', () => {
    const p = remapPriority([{ severity: 0.1, areaM2: 1, trafficPerM2PerDay: 1 }], 9);
    // 0.7 · 0.1 + 0.3 · 0.1 = 0.1.
    expect(p.score).toBeCloseTo(0.1, 12);
    expect(p.label).toBe('low');
    expect(remapPriority([], 5)).toEqual({ score: 0, label: 'low' });
  });

  it('when severities are out of range, then they are clamped and the score stays within 0–1', () => {
    const p = remapPriority([{ severity: 3, areaM2: 1, trafficPerM2PerDay: 100 }], 0);
    expect(p.score).toBeCloseTo(1, 12);
  });
});
