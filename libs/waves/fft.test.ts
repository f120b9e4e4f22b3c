import { describe, expect, it } from 'vitest';
import { complexDft, nextPowerOfTwo, planFor, realForward, realForwardEven, realInverse } from './fft.js';

/** naive O(N^2) DFT, the definition X_m = sum x_n exp(-2 pi i m n/N) */
function naive(re: Float64Array, im: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = re.length;
  const outRe = new Float64Array(n);
  const outIm = new Float64Array(n);
  for (let m = 0; m < n; m++) {
    let sr = 0;
    let si = 0;
    for (let j = 0; j < n; j++) {
      const a = (-2 * Math.PI * ((m * j) % n)) / n;
      sr += (re[j] as number) * Math.cos(a) - (im[j] as number) * Math.sin(a);
      si += (re[j] as number) * Math.sin(a) + (im[j] as number) * Math.cos(a);
    }
    outRe[m] = sr;
    outIm[m] = si;
  }
  return { re: outRe, im: outIm };
}

const signal = (n: number, seed: number): Float64Array => {
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = Math.sin(0.37 * i * seed + 0.1) + 0.5 * Math.cos(1.91 * i + seed);
  return x;
};

describe('complexDft (fft.js for 2^k, Bluestein otherwise) against the naive DFT', () => {
  for (const n of [1, 2, 3, 5, 12, 17, 64, 100, 257, 1000]) {
    it(`N = ${n}: forward to 1e-10 of the largest bin, inverse round trip to 1e-12`, () => {
      const re = signal(n, 1);
      const im = signal(n, 2);
      const data = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) {
        data[2 * i] = re[i] as number;
        data[2 * i + 1] = im[i] as number;
      }
      const out = new Float64Array(2 * n);
      complexDft(data, out, n, false);
      const ref = naive(re, im);
      let scale = 1;
      for (let m = 0; m < n; m++)
        scale = Math.max(scale, Math.hypot(ref.re[m] as number, ref.im[m] as number));
      for (let m = 0; m < n; m++) {
        expect(Math.abs((out[2 * m] as number) - (ref.re[m] as number)) / scale).toBeLessThan(1e-10);
        expect(Math.abs((out[2 * m + 1] as number) - (ref.im[m] as number)) / scale).toBeLessThan(1e-10);
      }
      const back = new Float64Array(2 * n);
      complexDft(out, back, n, true);
      for (let i = 0; i < 2 * n; i++)
        expect(Math.abs((back[i] as number) - (data[i] as number))).toBeLessThan(1e-12);
    });
  }
});

describe('realForward (fft.js realTransform)', () => {
  for (const n of [8, 16, 256, 1024]) {
    it(`N = ${n}: bins 0..N/2 equal the naive DFT`, () => {
      const x = signal(n, 3);
      const out = new Float64Array(2 * n);
      realForward(planFor(n), x, out);
      const ref = naive(x, new Float64Array(n));
      for (let m = 0; m <= n / 2; m++) {
        expect(out[2 * m]).toBeCloseTo(ref.re[m] as number, 9);
        expect(out[2 * m + 1]).toBeCloseTo(ref.im[m] as number, 9);
      }
    });
  }

  for (const n of [4, 8, 64, 2048, 6, 30, 1800]) {
    it(`realInverse N = ${n}: inverts the forward transform to 1e-13`, () => {
      const x = signal(n, 4);
      const spec = new Float64Array(2 * n);
      if (nextPowerOfTwo(n) === n) realForward(planFor(n), x, spec);
      else realForwardEven(x, n, spec, new Float64Array(n));
      const back = new Float64Array(n);
      realInverse(spec, back, n, new Float64Array(n));
      for (let i = 0; i < n; i++)
        expect(Math.abs((back[i] as number) - (x[i] as number))).toBeLessThan(1e-13);
    });
  }

  for (const n of [2, 6, 10, 30, 1800]) {
    it(`realForwardEven N = ${n}: bins 0..N/2 equal the naive DFT`, () => {
      const x = signal(n, 5);
      const spec = new Float64Array(2 * n);
      realForwardEven(x, n, spec, new Float64Array(n));
      const ref = naive(x, new Float64Array(n));
      for (let m = 0; m <= n / 2; m++) {
        expect(Math.abs((spec[2 * m] as number) - (ref.re[m] as number))).toBeLessThan(1e-9);
        expect(Math.abs((spec[2 * m + 1] as number) - (ref.im[m] as number))).toBeLessThan(1e-9);
      }
    });
  }

  it('nextPowerOfTwo', () => {
    expect([1, 2, 3, 1000, 1024, 1025].map(nextPowerOfTwo)).toEqual([2, 2, 4, 1024, 1024, 2048]);
  });
});
