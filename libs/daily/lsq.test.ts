import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { invertSpd, madScale, median, weightedLeastSquares } from './lsq.js';
import { seeded } from './test-helpers.js';

describe('weightedLeastSquares (Householder QR)', () => {
  it('recovers an exact line and leaves no residual (analytic)', () => {
    const xs = [0, 1, 2, 3, 4, 5];
    const f = weightedLeastSquares(
      xs.map((x) => [1, x]),
      xs.map((x) => 2 + 3 * x),
    );
    if (!f.ok) throw new Error(f.reason);
    expect(f.coef[0]).toBeCloseTo(2, 12);
    expect(f.coef[1]).toBeCloseTo(3, 12);
    expect(f.chi2).toBeLessThan(1e-20);
  });

  it('gives the textbook covariance of a straight-line fit: var(b) = 1/sum w (x - xbar_w)^2 (analytic)', () => {
    const xs = [1, 2, 4, 7, 11];
    const w = [1, 4, 0.25, 2, 1];
    const f = weightedLeastSquares(
      xs.map((x) => [1, x]),
      xs.map((x) => 5 - x),
      w,
    );
    if (!f.ok) throw new Error(f.reason);
    const sw = w.reduce((a, b) => a + b, 0);
    const xbar = xs.reduce((a, x, i) => a + w[i]! * x, 0) / sw;
    const sxx = xs.reduce((a, x, i) => a + w[i]! * (x - xbar) ** 2, 0);
    expect(f.covUnscaled[3]).toBeCloseTo(1 / sxx, 12);
    expect(f.covUnscaled[0]).toBeCloseTo(1 / sw + (xbar * xbar) / sxx, 12);
    expect(f.covUnscaled[1]).toBeCloseTo(-xbar / sxx, 12);
  });

  it('matches the normal equations on a random well-conditioned problem', () => {
    const r = seeded(3);
    const rows = Array.from({ length: 40 }, () => [1, r.normal(), r.normal(), r.uniform()]);
    const y = rows.map((x) => 1 - 2 * x[1]! + 0.5 * x[2]! + 3 * x[3]! + 0.1 * r.normal());
    const w = rows.map(() => 0.5 + r.uniform());
    const f = weightedLeastSquares(rows, y, w);
    if (!f.ok) throw new Error(f.reason);
    const p = 4;
    const xtwx = new Array<number>(p * p).fill(0);
    const xtwy = new Array<number>(p).fill(0);
    rows.forEach((x, i) => {
      for (let a = 0; a < p; a++) {
        xtwy[a]! += w[i]! * x[a]! * y[i]!;
        for (let b = 0; b < p; b++) xtwx[a * p + b]! += w[i]! * x[a]! * x[b]!;
      }
    });
    const inv = invertSpd(xtwx, p) as number[];
    for (let a = 0; a < p; a++) {
      const b = inv.slice(a * p, a * p + p).reduce((s, c, j) => s + c * xtwy[j]!, 0);
      expect(f.coef[a]).toBeCloseTo(b, 10);
      for (let c = 0; c < p; c++) expect(f.covUnscaled[a * p + c]).toBeCloseTo(inv[a * p + c]!, 10);
    }
  });

  it('refuses a rank-deficient design and too few rows', () => {
    const dup = weightedLeastSquares(
      [
        [1, 2],
        [2, 4],
        [3, 6],
      ],
      [1, 2, 3],
    );
    expect(dup).toEqual({ ok: false, reason: 'rank_deficient' });
    expect(weightedLeastSquares([[1, 2]], [1])).toEqual({ ok: false, reason: 'too_few_rows' });
    expect(weightedLeastSquares([[1], [NaN]], [1, 2])).toEqual({ ok: false, reason: 'non_finite' });
  });

  it('property: exact data y = X b is recovered for any well-spread design', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 3, maxLength: 3 }),
        fc.integer({ min: 1, max: 1e6 }),
        (b, seed) => {
          const r = seeded(seed);
          const rows = Array.from({ length: 12 }, () => [1, r.normal(), r.normal()]);
          const y = rows.map((x) => x[0]! * b[0]! + x[1]! * b[1]! + x[2]! * b[2]!);
          const f = weightedLeastSquares(rows, y);
          if (!f.ok) return false;
          return f.coef.every((c, i) => Math.abs(c - b[i]!) < 1e-9 * (1 + Math.abs(b[i]!)));
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('robust scale helpers', () => {
  it('median and the normalised MAD (Hampel 1974)', () => {
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 2, 3])).toBe(2.5);
    // MAD of 1..5 about 3 is 1; times 1.4826.
    expect(madScale([1, 2, 3, 4, 5])).toBeCloseTo(1.4826, 10);
    const r = seeded(9);
    const xs = Array.from({ length: 20000 }, () => 2.5 * r.normal());
    expect(madScale(xs)).toBeGreaterThan(2.4);
    expect(madScale(xs)).toBeLessThan(2.6);
  });
  it('invertSpd refuses a matrix that is not positive definite', () => {
    expect(invertSpd([1, 2, 2, 1], 2)).toBeUndefined();
    const inv = invertSpd([4, 0, 0, 2], 2) as number[];
    [0.25, 0, 0, 0.5].forEach((v, i) => expect(inv[i]).toBeCloseTo(v, 14));
  });
});
