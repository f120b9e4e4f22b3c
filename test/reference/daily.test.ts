// Checks the fits of libs/daily and libs/forecast against outside references: scipy's curve_fit (weighted,
// absolute_sigma=False) and least_squares (Huber loss) and numpy's lstsq, on the same windows, from
// test/reference/daily/generate.py (scipy 1.18.1, numpy 2.5.5), committed in test/reference/vectors/daily.json.
// Tolerances: both sides solve the same least-squares problem to near machine precision; the golden-section
// search for Ik stops at 1e-10 in ln Ik, so parameters agree to 1e-7 relative and standard errors to 1e-5.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitCalcificationOmega, fitTanhCurve, type LightPoint } from '../../libs/daily/index.js';
import { fitTide } from '../../libs/forecast/index.js';

interface Case {
  name: string;
  sign: -1 | 1;
  par: number[];
  rate: number[];
  sigma: number[];
  params: [number, number, number];
  se?: [number, number, number];
  scale?: number;
}
interface Window {
  transect: string;
  valid: boolean;
  ncp: number | null;
  ncp_sigma: number | null;
  nec: number | null;
  nec_sigma: number | null;
  par: number | null;
}
const v = JSON.parse(readFileSync(new URL('./vectors/daily.json', import.meta.url), 'utf8')) as {
  source: string;
  synthetic: Case[];
  robust: Case[];
  reef: {
    fits: { transect: string; kind: 'ncp' | 'nec'; n: number; params: number[]; se: number[] }[];
  };
  omega: { omega: number[]; rate: number[]; sigma: number[]; params: number[]; se: number[] };
  tide: {
    t_ms: number[];
    level: number[];
    mean: number;
    constituents: Record<string, { amplitude: number; phase_deg: number }>;
  };
};
const windows = (
  JSON.parse(readFileSync(new URL('./daily/windows.json', import.meta.url), 'utf8')) as { windows: Window[] }
).windows;

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const points = (c: Case): LightPoint[] =>
  c.par.map((p, i) => ({ parUmolM2S: p, rate: c.rate[i]!, sigma: c.sigma[i]! }));
const params = (f: ReturnType<typeof fitTanhCurve>) => {
  if (!f.ok) throw new Error(f.reason);
  return {
    p: [f.curve.amp, f.curve.ik, f.curve.intercept],
    se: [f.se.amp, f.se.ik, f.se.intercept],
    scale: f.scale,
  };
};

describe(`light-response fits against scipy (${v.source})`, () => {
  it.each(v.synthetic.map((c) => [c.name, c] as const))(
    '%s: curve_fit parameters and standard errors',
    (_, c) => {
      const f = params(fitTanhCurve(points(c), c.sign, { loss: 'linear' }));
      for (let i = 0; i < 3; i++) {
        expect(rel(f.p[i]!, c.params[i]!)).toBeLessThan(1e-7);
        expect(rel(f.se[i]!, c.se![i]!)).toBeLessThan(1e-5);
      }
    },
  );

  it.each(v.robust.map((c) => [c.name, c] as const))(
    '%s: Huber M-estimate of least_squares(loss=huber)',
    (_, c) => {
      const f = params(fitTanhCurve(points(c), c.sign));
      for (let i = 0; i < 3; i++) expect(rel(f.p[i]!, c.params[i]!)).toBeLessThan(1e-6);
      expect(rel(f.scale, c.scale!)).toBeLessThan(1e-6);
    },
  );

  it.each(v.reef.fits.map((c) => [`${c.transect} ${c.kind}`, c] as const))(
    'the reef windows, %s: the same windows give the same curve',
    (_, c) => {
      const pts = windows
        .filter((w) => w.transect === c.transect && w.valid && w[c.kind] !== null && w.par !== null)
        .filter((w) => w[`${c.kind}_sigma`] !== null)
        .map((w) => ({ parUmolM2S: Math.max(0, w.par!), rate: w[c.kind]!, sigma: w[`${c.kind}_sigma`]! }));
      expect(pts.length).toBe(c.n);
      const f = params(fitTanhCurve(pts, c.kind === 'ncp' ? -1 : 1, { loss: 'linear' }));
      for (let i = 0; i < 3; i++) {
        expect(rel(f.p[i]!, c.params[i]!)).toBeLessThan(1e-7);
        expect(rel(f.se[i]!, c.se[i]!)).toBeLessThan(1e-5);
      }
    },
  );
});

describe('NEC against Omega_ar and the harmonic tide against scipy and numpy', () => {
  it('a straight line by curve_fit: intercept, slope and their standard errors', () => {
    const o = v.omega;
    const f = fitCalcificationOmega(
      o.omega.map((x, i) => ({ omegaAr: x, rate: o.rate[i]!, sigma: o.sigma[i]! })),
      { loss: 'linear' },
    );
    if (!f.ok) throw new Error(f.reason);
    expect(rel(f.interceptMmolM2H, o.params[0]!)).toBeLessThan(1e-7); // curve_fit iterates a linear model to its own tolerance
    expect(rel(f.slopeMmolM2HPerOmega, o.params[1]!)).toBeLessThan(1e-7);
    expect(rel(f.se.intercept, o.se[0]!)).toBeLessThan(1e-7);
    expect(rel(f.se.slope, o.se[1]!)).toBeLessThan(1e-7);
  });

  it('M2, K1, S2 amplitudes and phases by lstsq over 20 days', () => {
    const f = fitTide(v.tide.t_ms, v.tide.level, { allow: ['M2', 'K1', 'S2'] });
    if (!f.ok) throw new Error(f.reason);
    expect(f.meanLevel).toBeCloseTo(v.tide.mean, 10);
    for (const c of f.constituents) {
      const ref = v.tide.constituents[c.name]!;
      expect(rel(c.amplitude, ref.amplitude)).toBeLessThan(1e-9);
      expect(Math.abs(c.phaseDeg - ref.phase_deg)).toBeLessThan(1e-7);
    }
    expect(f.constituents.map((c) => c.name)).toEqual(['M2', 'K1', 'S2']);
  });
});
