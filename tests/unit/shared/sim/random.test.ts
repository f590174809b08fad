import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { createRng, mixSeed } from '../../../../shared/sim/random.js';

const N = 20_000;

function meanAndVariance(xs: Float64Array): [number, number] {
  let m = 0;
  for (const x of xs) m += x;
  m /= xs.length;
  let v = 0;
  for (const x of xs) v += (x - m) ** 2;
  return [m, v / (xs.length - 1)];
}

describe('createRng', () => {
  it('when two generators share a seed, then they give the same sequence, and another seed gives another', () => {
    // Arrange
    const a = createRng(1234);
    const b = createRng(1234);
    const c = createRng(1235);

    // Act
    const sa = Array.from({ length: 50 }, () => a.next());
    const sb = Array.from({ length: 50 }, () => b.next());
    const sc = Array.from({ length: 50 }, () => c.next());

    // Assert
    expect(sa).toEqual(sb);
    expect(sa).not.toEqual(sc);
  });

  it('when drawing uniform numbers, then they pass a Kolmogorov–Smirnov test against U(0, 1)', () => {
    // Arrange: critical value of the one-sample KS statistic at α = 0.001 is ≈ 1.949 / √n
    // (Smirnov 1948, "Table for estimating the goodness of fit of empirical distributions").
    const rng = createRng(7);
    const xs = Float64Array.from({ length: N }, () => rng.next()).sort();

    // Act
    let d = 0;
    for (let k = 0; k < N; k++) d = Math.max(d, Math.abs((k + 1) / N - xs[k]), Math.abs(xs[k] - k / N));

    // Assert
    expect(xs[0]).toBeGreaterThanOrEqual(0);
    expect(xs[N - 1]).toBeLessThan(1);
    expect(d).toBeLessThan(1.949 / Math.sqrt(N));
  });

  it('when drawing Gaussian deviates with σ = 0.02, then sample mean and variance fall inside their 99.9 % intervals', () => {
    // Arrange: Box & Muller 1958, "A Note on the Generation of Random Normal Deviates"; the
    // intervals use the normal and χ² quantiles of jstat@1.9.6: mean ± z·σ/√n and
    // (n − 1)s²/σ² within χ²(n − 1) quantiles.
    const sigma = 0.02;
    const rng = createRng(99);
    const xs = Float64Array.from({ length: N }, () => rng.gaussian(sigma));

    // Act
    const [mean, variance] = meanAndVariance(xs);

    // Assert
    const z = jStat.normal.inv(0.9995, 0, 1);
    expect(Math.abs(mean)).toBeLessThan((z * sigma) / Math.sqrt(N));
    const stat = ((N - 1) * variance) / sigma ** 2;
    expect(stat).toBeGreaterThan(jStat.chisquare.inv(0.0005, N - 1));
    expect(stat).toBeLessThan(jStat.chisquare.inv(0.9995, N - 1));
  });

  it('when drawing integers below 6, then every face appears and none outside [0, 6)', () => {
    // Arrange
    const rng = createRng(5);
    const counts = new Int32Array(7);

    // Act
    for (let k = 0; k < 6000; k++) counts[Math.min(6, rng.int(6))]++;

    // Assert: each face expects 1000; ±150 is > 4.5 binomial standard deviations (√(6000·1/6·5/6) ≈ 28.9).
    expect(counts[6]).toBe(0);
    for (let f = 0; f < 6; f++) expect(Math.abs(counts[f] - 1000)).toBeLessThan(150);
  });
});

describe('mixSeed', () => {
  it('when mixing the same parts, then the seed repeats; when order or a part changes, then it differs', () => {
    // Arrange, Act
    const s = mixSeed(42, 3, 1);

    // Assert
    expect(mixSeed(42, 3, 1)).toBe(s);
    expect(mixSeed(42, 1, 3)).not.toBe(s);
    expect(mixSeed(42, 3, 2)).not.toBe(s);
    expect(s).toBeGreaterThanOrEqual(0);
    expect(s).toBeLessThan(2 ** 32);
  });
});
