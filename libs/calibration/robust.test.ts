import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { repeatedMedian, robustLine, robustLocation } from './robust.js';

/** A small seeded generator for the tests (Park & Miller minimal standard; Box-Muller normals). */
function rng(seed: number): { u: () => number; n: () => number } {
  let s = seed % 2147483647 || 1;
  const u = () => {
    s = (s * 48271) % 2147483647;
    return s / 2147483647;
  };
  return { u, n: () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u()) };
}

/** Ordinary least squares with its textbook standard errors (common practice), the comparison for clean data. */
function ols(x: number[], y: number[]) {
  const n = x.length;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i]! - mx) ** 2;
    sxy += (x[i]! - mx) * (y[i]! - my);
  }
  const b = sxy / sxx;
  const a = my - b * mx;
  const s2 = y.reduce((s, v, i) => s + (v - a - b * x[i]!) ** 2, 0) / (n - 2);
  return { a, b, seB: Math.sqrt(s2 / sxx), seA: Math.sqrt(s2 * (1 / n + (mx * mx) / sxx)) };
}

describe('repeated median (Siegel 1982)', () => {
  it('returns the exact line when just under half the points are gross outliers', () => {
    const x = Array.from({ length: 21 }, (_, i) => i);
    const y = x.map((v) => 3 - 0.5 * v);
    for (const i of [0, 2, 5, 7, 11, 13, 15, 17, 19, 20]) y[i] = 1000 + i; // 10 of 21
    const r = repeatedMedian(x, y);
    expect(r.b).toBeCloseTo(-0.5, 12);
    expect(r.a).toBeCloseTo(3, 12);
  });
});

describe('robustLine', () => {
  it('on clean normal data agrees with least squares (a, b within half their SE; SEs within 10 %)', () => {
    const g = rng(7);
    const x = Array.from({ length: 40 }, (_, i) => i * 0.25);
    const y = x.map((v) => -12 + 0.4 * v + 1.5 * g.n());
    const f = robustLine(x, y)!;
    const o = ols(x, y);
    expect(Math.abs(f.a - o.a)).toBeLessThan(0.5 * o.seA); // 95 % efficiency: ~0.23 SE apart on average
    expect(Math.abs(f.b - o.b)).toBeLessThan(0.5 * o.seB);
    expect(f.seA / o.seA).toBeGreaterThan(0.9);
    expect(f.seA / o.seA).toBeLessThan(1.1);
    expect(f.seB / o.seB).toBeGreaterThan(0.9);
    expect(f.seB / o.seB).toBeLessThan(1.1);
    expect(f.weights.every((w) => w > 0)).toBe(true);
  });

  it('gives an outlier bottle zero weight and stays on the true line', () => {
    const g = rng(11);
    const x = Array.from({ length: 16 }, (_, i) => i * 0.7);
    const y = x.map((v) => -12 + 0.2 * v + 1.0 * g.n());
    y[5] = y[5]! + 40; // a bottle drawn from the wrong water
    const f = robustLine(x, y)!;
    expect(f.weights[5]).toBe(0);
    expect(f.weights.filter((w) => w === 0)).toHaveLength(1);
    expect(Math.abs(f.a + 12)).toBeLessThan(3 * f.seA);
    expect(Math.abs(f.b - 0.2)).toBeLessThan(3 * f.seB);
    // least squares is pulled by the outlier well beyond the robust fit's error
    expect(Math.abs(ols(x, y).a + 12)).toBeGreaterThan(Math.abs(f.a + 12));
  });

  it('standard errors match the scatter of the estimates over 400 simulated data sets (within 15 %)', () => {
    const g = rng(3);
    const x = Array.from({ length: 12 }, (_, i) => i);
    const bs: number[] = [];
    const ses: number[] = [];
    for (let k = 0; k < 400; k++) {
      const y = x.map((v) => 5 + 0.3 * v + 2 * g.n());
      if (k % 10 === 0) y[k % 12] = y[k % 12]! + 50; // one outlier in a tenth of the sets
      const f = robustLine(x, y)!;
      bs.push(f.b);
      ses.push(f.seB);
    }
    const mean = bs.reduce((s, v) => s + v, 0) / bs.length;
    const sd = Math.sqrt(bs.reduce((s, v) => s + (v - mean) ** 2, 0) / (bs.length - 1));
    const rms = Math.sqrt(ses.reduce((s, v) => s + v * v, 0) / ses.length);
    expect(Math.abs(mean - 0.3)).toBeLessThan(3 * (sd / Math.sqrt(bs.length)));
    expect(rms / sd).toBeGreaterThan(0.85);
    expect(rms / sd).toBeLessThan(1.15);
  });

  it('refuses fewer than 3 points or a single distinct x', () => {
    expect(robustLine([0, 1], [1, 2])).toBeUndefined();
    expect(robustLine([2, 2, 2, 2], [1, 2, 3, 4])).toBeUndefined();
  });

  it('property: exact lines are recovered exactly, with or without a few gross outliers', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -100, max: 100, noNaN: true }),
        fc.double({ min: -5, max: 5, noNaN: true }),
        fc.integer({ min: 8, max: 30 }),
        fc.array(fc.nat(), { maxLength: 2 }),
        (a, b, n, bad) => {
          const x = Array.from({ length: n }, (_, i) => i * 0.5);
          const y = x.map((v) => a + b * v);
          for (const i of bad) y[i % n] = y[i % n]! + 1e4;
          const f = robustLine(x, y)!;
          expect(f.a).toBeCloseTo(a, 6);
          expect(f.b).toBeCloseTo(b, 6);
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('robustLocation', () => {
  it('is the mean on clean data and ignores an outlier', () => {
    const y = [10.1, 9.9, 10.2, 9.8, 10.0, 10.05, 9.95];
    const f = robustLocation(y)!;
    expect(f.a).toBeCloseTo(10, 1);
    const g = robustLocation([...y, 30])!;
    expect(g.weights.at(-1)).toBe(0);
    expect(Math.abs(g.a - 10)).toBeLessThan(0.1);
    expect(g.seA).toBeGreaterThan(0.01);
    expect(g.seA).toBeLessThan(0.2);
  });
});
