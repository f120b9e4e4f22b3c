import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { despike, detrend, fillGaps, median } from './prep.js';

describe('fillGaps', () => {
  it('interpolates inner gaps linearly and holds the nearest value at the ends', () => {
    const out = new Float64Array(7);
    const bad = fillGaps([NaN, 1, NaN, NaN, 4, Infinity, NaN], out, 7);
    expect(bad).toBe(5);
    expect(Array.from(out)).toEqual([1, 1, 2, 3, 4, 4, 4]);
    expect(fillGaps([NaN, NaN], new Float64Array(2), 2)).toBe(-1);
  });
});

describe('detrend', () => {
  it('removes an exact line (order 1) and an exact parabola (order 2) to 1e-12', () => {
    const n = 1001;
    const a = new Float64Array(n);
    const b = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      a[i] = 3.2 + 0.01 * i;
      b[i] = 5 - 0.002 * i + 3e-6 * i * i;
    }
    detrend(a, n, 1);
    detrend(b, n, 2);
    for (let i = 0; i < n; i++) {
      expect(Math.abs(a[i] as number)).toBeLessThan(1e-12);
      expect(Math.abs(b[i] as number)).toBeLessThan(1e-12);
    }
  });

  it('leaves a residual orthogonal to 1, t and t^2 (least squares normal equations)', () => {
    const n = 500;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = Math.sin(i * 0.3) + 0.001 * i * i + Math.cos(i);
    detrend(x, n, 2);
    let s0 = 0,
      s1 = 0,
      s2 = 0;
    for (let i = 0; i < n; i++) {
      s0 += x[i] as number;
      s1 += (x[i] as number) * i;
      s2 += (x[i] as number) * i * i;
    }
    expect(Math.abs(s0)).toBeLessThan(1e-9);
    expect(Math.abs(s1)).toBeLessThan(1e-6);
    expect(Math.abs(s2)).toBeLessThan(1e-3);
  });
});

describe('median (quickselect)', () => {
  it('equals the sorted middle for random arrays (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 300 }),
        (arr) => {
          const x = Float64Array.from(arr);
          const s = Float64Array.from(arr).sort();
          const n = s.length;
          const want =
            n % 2 ? (s[n >> 1] as number) : 0.5 * ((s[n / 2 - 1] as number) + (s[n / 2] as number));
          return median(x, n, new Float64Array(n)) === want;
        },
      ),
      { numRuns: 500, seed: 7 },
    );
  });
});

describe('despike (Hampel 1974, 5 sigma_r, sigma_r = 1.4826 MAD)', () => {
  it('replaces isolated spikes by interpolation and keeps a Gaussian-like signal intact', () => {
    const n = 1000;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = Math.sin(i * 0.2);
    const clean = Float64Array.from(x);
    x[100] = 50;
    x[101] = -40;
    x[999] = 30;
    const replaced = despike(x, n, 5, 0.002, new Float64Array(n), new Float64Array(n));
    expect(replaced).toBe(3);
    // sine: MAD = 0.707, sigma_r = 1.05, the sine itself (|x| <= 1) is never touched
    for (let i = 0; i < n; i++) if (i !== 100 && i !== 101 && i !== 999) expect(x[i]).toBe(clean[i]);
    expect(x[100]).toBeCloseTo(
      (clean[99] as number) + ((clean[102] as number) - (clean[99] as number)) / 3,
      12,
    );
    expect(x[999]).toBe(clean[998]);
  });

  it('floors sigma_r so that a quantized record with MAD = 0 is not despiked', () => {
    const n = 200;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i += 10) x[i] = 0.005; // 5 mm steps, 90 % zeros
    expect(despike(x, n, 5, 0.002, new Float64Array(n), new Float64Array(n))).toBe(0);
  });
});

describe('despike shortcut (no second selection when no spike is possible)', () => {
  it('gives the same replacements as the full rule on random records with and without spikes', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 5, maxLength: 200 }),
        fc.array(fc.nat(199), { maxLength: 5 }),
        (arr, spikeAt) => {
          const x = Float64Array.from(arr);
          for (const i of spikeAt) if (i < x.length) x[i] = 40 * ((i % 2) - 0.5);
          // reference: the rule written out with a full sort
          const s = Float64Array.from(x).sort();
          const n = x.length;
          const mid = (a: Float64Array): number =>
            n % 2 ? (a[n >> 1] as number) : 0.5 * ((a[n / 2 - 1] as number) + (a[n / 2] as number));
          const med = mid(s);
          const dev = Float64Array.from(x, (v) => Math.abs(v - med)).sort();
          const limit = 5 * Math.max(1.4826 * mid(dev), 0.002);
          let want = 0;
          for (const v of x) if (Math.abs(v - med) > limit) want++;
          return despike(x, n, 5, 0.002, new Float64Array(n), new Float64Array(n)) === want;
        },
      ),
      { numRuns: 1000, seed: 11 },
    );
  });
});
