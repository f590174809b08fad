import { describe, expect, it } from 'vitest';
import { degrees, driftSentence, millimetres, pText } from '../../../../shared/docking/drift-sentence.js';
import { DAY_MS, detectDrift } from '../../../../shared/docking/drift.js';
import { createRng } from '../../../../shared/sim/random.js';

const START = Date.UTC(2026, 10, 1);
const NOW = START + 28 * DAY_MS;
const TOL = { positionM: 0.01, yawRad: Math.PI / 180 };
const dayOf = (t: number) => new Date(t).toISOString().slice(0, 10);
const format = { day: (ms: number) => new Date(ms).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', timeZone: 'UTC' }) };

function dockings(mean: (t: number) => number, count = 28 * 12) {
  const rng = createRng(4);
  return Array.from({ length: count }, (_, k) => {
    const t = START + (k / count) * 28 * DAY_MS;
    return { tMs: t, dx: mean(t) + rng.gaussian(0.0015), dy: rng.gaussian(0.0015), dyaw: rng.gaussian(0.003) };
  });
}

describe('drift sentence', () => {
  it('when numbers are written, then millimetres, degrees and p-values read as on the page', () => {
    expect(millimetres(0.0042)).toBe('4.2 mm');
    expect(millimetres(0.0213)).toBe('21 mm');
    expect(degrees(Math.PI / 90)).toBe('2.0°');
    expect(pText(0.00004)).toBe('p < 0.001');
    expect(pText(0.0042)).toBe('p = 0.0042');
  });

  it('when the station stepped, then the sentence names the size, the day, the test and the side of the tolerance', () => {
    const knock = START + 21 * DAY_MS;
    const verdict = detectDrift(dockings((t) => (t < knock ? 0 : 0.02)), TOL, NOW, dayOf);
    expect(driftSentence(verdict, format)).toMatch(/^Moved about (19|20|21) mm around 2[12] Nov \(Pettitt change-point test, p < 0\.001\): the median offset since then is (19|20|21) mm, beyond the 10 mm tolerance\.$/);
  });

  it('when the station creeps, then the sentence gives the rate and when it passes the tolerance', () => {
    const verdict = detectDrift(dockings((t) => (0.012 / 28) * ((t - START) / DAY_MS)), TOL, NOW, dayOf);
    expect(driftSentence(verdict, format)).toMatch(/^Creeping 0\.4\d mm a day \(Theil–Sen slope of the daily medians; Mann–Kendall test, p < 0\.001\): the fitted offset is 1[12] mm now, past the 10 mm tolerance since about 2[3-5] Nov\.$/);
  });

  it('when the station is steady or has too few dockings, then the sentence says so with the recent offset', () => {
    expect(driftSentence(detectDrift(dockings(() => 0.002), TOL, NOW, dayOf), format)).toMatch(/^Steady: no step or trend in the mean offset beyond the thresholds \(Pettitt and Mann–Kendall tests at 1 %\); median offset of the last 7 days \d\.\d mm \(tolerance 10 mm\)\.$/);
    expect(driftSentence(detectDrift(dockings(() => 0, 12), TOL, NOW, dayOf), format)).toBe('No verdict yet: 12 dockings in the window; the drift check needs at least 20.');
    expect(driftSentence(detectDrift(dockings(() => 0.015), TOL, NOW, dayOf), format)).toMatch(/^No drift in the window, but the median offset of the last 7 days is 15 mm, beyond the 10 mm tolerance/);
  });
});
