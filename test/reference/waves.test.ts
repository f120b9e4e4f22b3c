// Checks libs/waves against outside references: scipy.signal.welch, scipy.stats.chi2.ppf,
// scipy.optimize.brentq (dispersion) and numpy.fft.fft, from test/reference/waves/generate.py
// (scipy 1.17.1, numpy 2.4.6), committed in test/reference/vectors/waves.json.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyzeBurst, chi2Quantile, solveDispersion, welchPsd } from '../../libs/waves/index.js';
import { complexDft } from '../../libs/waves/fft.js';

interface Vectors {
  g: number;
  welch: { name: string; fs: number; nperseg: number; x: number[]; f: number[]; psd: number[] }[];
  chi2: { nu: number; p: number; x: number }[];
  dispersion: { h: number; period: number; k0h: number; kh: number }[];
  dft: { x: number[]; re: number[]; im: number[] };
  pipeline: {
    name: string;
    fs: number;
    sensorHeightM: number;
    rhoKgM3: number;
    patmDbar: number;
    p: number[];
    nperseg: number;
    expected: Record<string, number>;
  }[];
}

const v = JSON.parse(readFileSync(new URL('./vectors/waves.json', import.meta.url), 'utf8')) as Vectors;

const relErr = (a: number, b: number): number => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('Welch PSD vs scipy.signal.welch (hann periodic, 50 % overlap, constant detrend, density)', () => {
  for (const c of v.welch) {
    it(`${c.name}: N=${c.x.length}, nperseg=${c.nperseg}, every bin to 1e-9 relative`, () => {
      const r = welchPsd(c.x, c.fs, c.nperseg);
      expect(r.psd.length).toBe(c.psd.length);
      let worst = 0;
      const peak = Math.max(...c.psd);
      for (let m = 0; m < c.psd.length; m++) {
        expect(r.fHz[m]).toBeCloseTo(c.f[m] as number, 12);
        // bins far below the peak are relative to the peak: the per-segment mean removal leaves ~1e-20 there
        const ref = c.psd[m] as number;
        const e = Math.abs((r.psd[m] as number) - ref) / Math.max(Math.abs(ref), 1e-12 * peak);
        worst = Math.max(worst, e);
      }
      expect(worst).toBeLessThan(1e-9);
    });
  }
});

describe('chi-square quantiles vs scipy.stats.chi2.ppf', () => {
  it('all (nu, p) pairs to 1e-10 relative', () => {
    for (const q of v.chi2) expect(relErr(chi2Quantile(q.p, q.nu), q.x)).toBeLessThan(1e-10);
  });
});

describe('dispersion solver vs scipy.optimize.brentq', () => {
  it('kh over h 0.3-50 m, T 1-300 s to 1e-10 relative', () => {
    for (const d of v.dispersion) {
      const omega = (2 * Math.PI) / d.period;
      const kh = solveDispersion(omega, d.h, v.g) * d.h;
      expect(relErr(kh, d.kh)).toBeLessThan(1e-10);
    }
  });
});

describe('Bluestein N-point DFT vs numpy.fft.fft', () => {
  it('N = 1500, every bin to 1e-9 of the largest magnitude', () => {
    const n = v.dft.x.length;
    const data = new Float64Array(2 * n);
    v.dft.x.forEach((x, i) => (data[2 * i] = x));
    const out = new Float64Array(2 * n);
    complexDft(data, out, n, false);
    let scale = 0;
    for (let m = 0; m < n; m++)
      scale = Math.max(scale, Math.hypot(v.dft.re[m] as number, v.dft.im[m] as number));
    let worst = 0;
    for (let m = 0; m < n; m++) {
      worst = Math.max(worst, Math.abs((out[2 * m] as number) - (v.dft.re[m] as number)) / scale);
      worst = Math.max(worst, Math.abs((out[2 * m + 1] as number) - (v.dft.im[m] as number)) / scale);
    }
    expect(worst).toBeLessThan(1e-9);
  });
});

describe('analyzeBurst vs an independent numpy/scipy implementation of docs/methods/waves.md 4.1-4.5', () => {
  for (const c of v.pipeline) {
    it(`${c.name}: every statistic to 1e-9 relative (IG height to 1e-9 of Hm0)`, () => {
      const r = analyzeBurst({
        pDbar: c.p,
        fsHz: c.fs,
        t0Ms: 0,
        sensorHeightM: c.sensorHeightM,
        patmDbar: c.patmDbar,
        rhoKgM3: c.rhoKgM3,
        gMS2: v.g,
      });
      if (!r.ok) throw new Error(r.reason);
      expect(r.notes.some((s) => s.startsWith(`Welch: nperseg ${c.nperseg},`))).toBe(true);
      const got = r as unknown as Record<string, number>;
      for (const [key, want] of Object.entries(c.expected)) {
        if (key === 'nWaves') expect(r.nWaves).toBe(want);
        else if (key === 'hm0IgM') expect(Math.abs((r.hm0IgM as number) - want)).toBeLessThan(1e-9 * r.hm0M);
        else expect(relErr(got[key] as number, want), key).toBeLessThan(1e-9);
      }
    });
  }
});
