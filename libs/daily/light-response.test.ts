import { describe, expect, it } from 'vitest';
import {
  evalTanh,
  fitTanhFixedIk,
  fitCalcificationLight,
  fitProductionLight,
  tanhVariance,
  type LightPoint,
} from './light-response.js';
import { mean, sd, seeded } from './test-helpers.js';

/** A day of window PAR: 24 dark windows and a sine-shaped light curve peaking at peakPar. */
function dayPar(peakPar: number, n = 72): number[] {
  return Array.from({ length: n }, (_, i) =>
    i < 24 ? 0 : peakPar * Math.sin((Math.PI * (i - 24 + 0.5)) / (n - 24)) ** 1.2,
  );
}
const ncpCurve = (I: number) => 58 * Math.tanh(I / 380) - 19;

describe('production-light fit, NCP = Pmax tanh(I/Ik) - R (Jassby & Platt 1976)', () => {
  it('exact tanh data recovers Pmax, Ik and R to 1e-6 (data-free analytic case)', () => {
    const pts: LightPoint[] = dayPar(2000).map((I) => ({ parUmolM2S: I, rate: ncpCurve(I), sigma: 1 }));
    const f = fitProductionLight(pts);
    if (!f.ok) throw new Error(f.reason);
    expect(f.curve.amp).toBeCloseTo(58, 6);
    expect(f.curve.ik).toBeCloseTo(380, 4);
    expect(f.curve.intercept).toBeCloseTo(19, 6);
    expect(f.nDark).toBe(24);
  });

  it('standard errors match the spread over 300 noisy replicate days (within 15 %); estimates unbiased', () => {
    const r = seeded(11);
    const est: number[][] = [[], [], []];
    const ses: number[][] = [[], [], []];
    for (let k = 0; k < 300; k++) {
      const pts = dayPar(1800).map((I) => ({ parUmolM2S: I, rate: ncpCurve(I) + 3 * r.normal(), sigma: 3 }));
      const f = fitProductionLight(pts, { loss: 'linear' });
      if (!f.ok) throw new Error(f.reason);
      [f.curve.amp, f.curve.ik, f.curve.intercept].forEach((v, i) => est[i]!.push(v));
      [f.se.amp, f.se.ik, f.se.intercept].forEach((v, i) => ses[i]!.push(v));
    }
    const truth = [58, 380, 19];
    for (let i = 0; i < 3; i++) {
      const ratio = sd(est[i]!) / mean(ses[i]!);
      expect(ratio).toBeGreaterThan(0.85);
      expect(ratio).toBeLessThan(1.15);
      expect(Math.abs(mean(est[i]!) - truth[i]!)).toBeLessThan(0.2 * sd(est[i]!) + 0.01 * truth[i]!);
    }
  });

  it('Huber IRLS shrugs off two wild windows that pull plain least squares away', () => {
    const r = seeded(5);
    const pts = dayPar(1800).map((I) => ({ parUmolM2S: I, rate: ncpCurve(I) + r.normal(), sigma: 1 }));
    // Two windows on the rising limb, 30 sigma high (bubbles on an optode, say).
    pts[28]!.rate += 30;
    pts[30]!.rate += 30;
    const robust = fitProductionLight(pts);
    const plain = fitProductionLight(pts, { loss: 'linear' });
    if (!robust.ok || !plain.ok) throw new Error('fit failed');
    expect(Math.abs(robust.curve.amp - 58)).toBeLessThan(1);
    expect(Math.abs(robust.curve.ik - 380)).toBeLessThan(15);
    expect(Math.abs(plain.curve.ik - 380)).toBeGreaterThan(50);
    expect(robust.se.ik).toBeLessThan(plain.se.ik / 3);
    expect(robust.scale).toBeGreaterThan(0.7);
    expect(robust.scale).toBeLessThan(1.4);
  });

  it('the overlap factor inflates the standard errors by sqrt(m)', () => {
    const r = seeded(8);
    const pts = dayPar(1500).map((I) => ({ parUmolM2S: I, rate: ncpCurve(I) + 2 * r.normal(), sigma: 2 }));
    const a = fitProductionLight(pts);
    const b = fitProductionLight(pts, { overlapFactor: 3 });
    if (!a.ok || !b.ok) throw new Error('fit failed');
    expect(b.se.amp / a.se.amp).toBeCloseTo(Math.sqrt(3), 8);
    expect(b.curve.amp).toBe(a.curve.amp);
  });

  it('refuses with a reason: too few windows, no dark windows, too little light, light never saturating', () => {
    const exact = (I: number) => ({ parUmolM2S: I, rate: ncpCurve(I), sigma: 1 });
    const few = fitProductionLight(dayPar(1800, 30).slice(20).map(exact));
    expect(few.ok ? '' : few.code).toBe('REEFD_DAILY_TOO_FEW_WINDOWS');
    const noDark = fitProductionLight(dayPar(1800).slice(22).map(exact));
    expect(noDark.ok ? '' : noDark.code).toBe('REEFD_DAILY_NO_DARK_WINDOWS');
    const dim = fitProductionLight(dayPar(150).map(exact));
    expect(dim.ok ? '' : dim.code).toBe('REEFD_DAILY_LIGHT_SPREAD');
    expect(dim.ok ? '' : dim.reason).toContain('brightest window 150');
    // Light reaching only a quarter of Ik: the curve is still straight, Pmax and Ik trade off.
    const r = seeded(4);
    const straight = fitProductionLight(
      dayPar(300).map((I) => ({
        parUmolM2S: I,
        rate: 58 * Math.tanh(I / 1200) - 19 + 0.5 * r.normal(),
        sigma: 0.5,
      })),
    );
    expect(straight.ok ? '' : straight.code).toBe('REEFD_DAILY_IK_UNRESOLVED');
    const flat = fitProductionLight(
      dayPar(1800).map((I) => ({ parUmolM2S: I, rate: -19 - I / 500, sigma: 1 })),
    );
    expect(flat.ok ? '' : flat.code).toBe('REEFD_DAILY_NO_LIGHT_RESPONSE');
  });
});

describe('calcification-light fit, NEC = Gmax tanh(I/Ik) + G0', () => {
  it('exact data recovers Gmax, Ik and a negative dark rate (dissolution at night)', () => {
    const pts = dayPar(2000).map((I) => ({ parUmolM2S: I, rate: 9 * Math.tanh(I / 250) - 1.5, sigma: 0.5 }));
    const f = fitCalcificationLight(pts);
    if (!f.ok) throw new Error(f.reason);
    expect(f.curve.amp).toBeCloseTo(9, 6);
    expect(f.curve.ik).toBeCloseTo(250, 4);
    expect(f.curve.intercept).toBeCloseTo(-1.5, 6);
    expect(f.curve.sign).toBe(1);
  });
});

describe('curve evaluation', () => {
  it('the gradient matches central differences and the variance is g^T C g', () => {
    const c = {
      amp: 50,
      ik: 300,
      intercept: 20,
      sign: -1 as const,
      cov: [4, 10, 0.5, 10, 900, 2, 0.5, 2, 1],
    };
    const I = 420;
    const e = evalTanh(c, I);
    expect(e.value).toBeCloseTo(50 * Math.tanh(1.4) - 20, 12);
    const h = 1e-4;
    const dIk =
      (evalTanh({ ...c, ik: 300 + h }, I).value - evalTanh({ ...c, ik: 300 - h }, I).value) / (2 * h);
    expect(e.grad[1]).toBeCloseTo(dIk, 8);
    const g = e.grad;
    let v = 0;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) v += g[i]! * c.cov[i * 3 + j]! * g[j]!;
    expect(tanhVariance(c, I)).toBeCloseTo(v, 12);
    expect(evalTanh(c, -5).value).toBe(-20);
  });
});

describe('the day curve with a known Ik (gap filling)', () => {
  it('exact data with the right Ik gives Pmax and R exactly; the covariance carries the given Ik variance', () => {
    const pts = dayPar(1500).map((I) => ({ parUmolM2S: I, rate: ncpCurve(I), sigma: 1 }));
    const f = fitTanhFixedIk(pts, -1, 380, 400);
    if (!f.ok) throw new Error(f.reason);
    expect(f.curve.amp).toBeCloseTo(58, 10);
    expect(f.curve.intercept).toBeCloseTo(19, 10);
    expect(f.curve.ik).toBe(380);
    expect(f.curve.cov[4]).toBe(400);
    expect(f.se.ik).toBe(20);
  });
  it('refuses too few windows and a flat response', () => {
    const few = fitTanhFixedIk([{ parUmolM2S: 100, rate: 1, sigma: 1 }], -1, 300, 0);
    expect(few.ok ? '' : few.code).toBe('REEFD_DAILY_TOO_FEW_WINDOWS');
    const flat = fitTanhFixedIk(
      dayPar(1500).map((I) => ({ parUmolM2S: I, rate: -19 - I / 300, sigma: 1 })),
      -1,
      300,
      0,
    );
    expect(flat.ok ? '' : flat.code).toBe('REEFD_DAILY_NO_LIGHT_RESPONSE');
  });
});
