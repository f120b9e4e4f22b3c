import { describe, expect, it } from 'vitest';
import { haltonNormals, normalCdf, normalQuantile, quantile, vanDerCorput } from './qmc.js';

describe('deterministic ensembles', () => {
  it('normal quantiles: 0.9 -> 1.2815516, 0.975 -> 1.959964, symmetric (common practice)', () => {
    expect(normalQuantile(0.9)).toBeCloseTo(1.2815516, 6);
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 6);
    expect(normalQuantile(0.001)).toBeCloseTo(-3.090232, 5);
    expect(normalQuantile(0.3)).toBeCloseTo(-normalQuantile(0.7), 10);
    expect(normalCdf(1.959964)).toBeCloseTo(0.975, 6);
  });
  it('van der Corput in base 2: 1/2, 1/4, 3/4, 1/8', () => {
    expect([1, 2, 3, 4].map((i) => vanDerCorput(i, 2))).toEqual([0.5, 0.25, 0.75, 0.125]);
  });
  it('128 Halton members in antithetic pairs have zero mean and unit sd in every dimension, and uncorrelated dimensions', () => {
    const n = 128;
    const z = haltonNormals(n, 6);
    for (let d = 0; d < 6; d++) {
      const xs = Array.from({ length: n }, (_, i) => z[i * 6 + d]!);
      const m = xs.reduce((a, b) => a + b, 0) / n;
      const sd = Math.sqrt(xs.reduce((a, b) => a + (b - m) ** 2, 0) / n);
      expect(Math.abs(m)).toBeLessThan(1e-12);
      expect(Math.abs(sd - 1)).toBeLessThan(0.08);
      const x0 = Array.from({ length: n }, (_, i) => z[i * 6]!);
      if (d > 0) expect(Math.abs(xs.reduce((a, x, i) => a + x * x0[i]!, 0) / n)).toBeLessThan(0.1);
    }
  });
  it('quantile interpolates like numpy (linear)', () => {
    expect(quantile([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantile([4, 1, 3, 2], 0.1)).toBeCloseTo(1.3, 12);
  });
});
