import { describe, expect, it } from 'vitest';
import { seeded } from '../daily/test-helpers.js';
import { fitFlowModel, predictFlow, type FlowSample } from './flow-model.js';

function samples(
  n: number,
  law: (H: number, h: number) => number,
  noiseLn: number,
  seed: number,
  fixH?: number,
) {
  const r = seeded(seed);
  const out: FlowSample[] = [];
  for (let i = 0; i < n; i++) {
    const H = fixH ?? 0.6 + 1.6 * r.uniform();
    const h = 0.9 + 0.9 * r.uniform();
    out.push({
      tMs: i * 600_000,
      uMS: law(H, h) * Math.exp(noiseLn * r.normal()),
      hm0OffshoreM: H,
      depthM: h,
    });
  }
  return out;
}

describe('flow model ln u = a + b ln H + c ln h', () => {
  it('recovers an exact power law u = 0.08 H^1.1 h^-0.7 (data-free analytic case)', () => {
    const m = fitFlowModel(
      samples(100, (H, h) => 0.08 * H ** 1.1 * h ** -0.7, 0, 1),
      0,
    );
    if (!m.ok) throw new Error(m.reason);
    expect(Math.exp(m.a)).toBeCloseTo(0.08, 10);
    expect(m.b).toBeCloseTo(1.1, 10);
    expect(m.c).toBeCloseTo(-0.7, 10);
    expect(predictFlow(m, 1.5, 1.2).uMS).toBeCloseTo(0.08 * 1.5 ** 1.1 * 1.2 ** -0.7, 10);
    expect(m.terms).toEqual({ wave: true, depth: true });
  });

  it('reports the residual spread in ln u and parameter sigmas that cover the truth', () => {
    const m = fitFlowModel(
      samples(600, (H, h) => 0.08 * H * h ** -0.5, 0.15, 2),
      0,
    );
    if (!m.ok) throw new Error(m.reason);
    expect(m.residualSdLn).toBeGreaterThan(0.13);
    expect(m.residualSdLn).toBeLessThan(0.17);
    expect(Math.abs(m.b - 1) / Math.sqrt(m.cov[4]!)).toBeLessThan(3);
    expect(Math.abs(m.c + 0.5) / Math.sqrt(m.cov[8]!)).toBeLessThan(3);
    const p = predictFlow(m, 1, 1);
    expect(p.residualSdLn).toBe(m.residualSdLn);
    expect(p.paramSdLn).toBeGreaterThan(0);
    expect(p.paramSdLn).toBeLessThan(0.05);
  });

  it('a calm week (the offshore height barely changing) leaves the wave term out instead of guessing it', () => {
    const m = fitFlowModel(
      samples(100, (H, h) => 0.08 * H * h ** -0.5, 0.05, 3, 1.2),
      0,
    );
    if (!m.ok) throw new Error(m.reason);
    expect(m.terms.wave).toBe(false);
    expect(m.b).toBe(0);
    expect(m.cov[4]).toBe(0);
    expect(Math.abs(m.c + 0.5)).toBeLessThan(0.1);
  });

  it('drops reverse and stalled ensembles and refuses too few', () => {
    const s = samples(40, () => 0.05, 0, 4);
    s.forEach((x, i) => i % 2 && (x.uMS = -0.03));
    const m = fitFlowModel(s, 0);
    expect(m.ok ? '' : m.reason).toBe('20 valid samples');
  });
});
