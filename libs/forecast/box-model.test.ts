import { describe, expect, it } from 'vitest';
import { seeded } from '../daily/test-helpers.js';
import { O2_MG_L_PER_MMOL_M3, fitBoxModel, stepBox, type BoxSample } from './box-model.js';

/** A box integrated finely (1-min steps, exact relaxation per step) with known kappa and R. */
function simulateNight(
  kappa: number,
  rMmolM2H: number,
  startMs: number,
  seed: number,
  noise = 0,
): BoxSample[] {
  const r = seeded(seed);
  const out: BoxSample[] = [];
  let o = 6.5;
  for (let m = 0; m <= 11 * 60; m++) {
    const tMs = startMs + m * 60_000;
    const h = 3.6 + 0.4 * Math.cos((2 * Math.PI * m) / (12.42 * 60));
    const driver = 0.1 + 0.05 * Math.sin((2 * Math.PI * m) / (9 * 60));
    const src = 6.0 - 0.4 * (m / 660);
    if (m % 15 === 0) out.push({ tMs, o2MgL: o + noise * r.normal(), o2SourceMgL: src, depthM: h, driver });
    o = stepBox(o, src, kappa * driver, (rMmolM2H * O2_MG_L_PER_MMOL_M3) / h, 1 / 60);
  }
  return out;
}

describe('one-box O2 budget', () => {
  it('recovers a known flushing coefficient and respiration from its own nights (analytic case, 2 %)', () => {
    const nights = [0, 1, 2].map((n) => simulateNight(1.6, 14, n * 86_400_000, n));
    const f = fitBoxModel(nights);
    if (!f.ok) throw new Error(f.reason);
    expect(Math.abs(f.kappa / 1.6 - 1)).toBeLessThan(0.02);
    expect(Math.abs(f.rMmolM2H / 14 - 1)).toBeLessThan(0.02);
  });

  it('with sensor noise the estimates stay within three sigmas of the truth', () => {
    const nights = [0, 1, 2, 3, 4].map((n) => simulateNight(1.6, 14, n * 86_400_000, 10 + n, 0.02));
    const f = fitBoxModel(nights);
    if (!f.ok) throw new Error(f.reason);
    expect(Math.abs(f.kappa - 1.6) / Math.sqrt(f.cov[0]!)).toBeLessThan(3);
    expect(Math.abs(f.rMmolM2H - 14) / Math.sqrt(f.cov[3]!)).toBeLessThan(3);
  });

  it('stepBox is the exact solution of the linear relaxation (and its no-exchange limit)', () => {
    // dO/dt = k (S - O) - r: O(t) = Oeq + (O0 - Oeq) e^-kt, Oeq = S - r/k.
    expect(stepBox(7, 6, 0.5, 0.1, 2)).toBeCloseTo(5.8 + (7 - 5.8) * Math.exp(-1), 12);
    expect(stepBox(7, 6, 0, 0.1, 2)).toBeCloseTo(6.8, 12);
  });

  it('refuses too few steps and a negative exchange', () => {
    const f = fitBoxModel([simulateNight(1.6, 14, 0, 1).slice(0, 10)]);
    expect(f.ok ? '' : f.reason).toBe('9 night steps');
    const away = simulateNight(1.6, 14, 0, 1).map((s) => ({
      ...s,
      o2SourceMgL: 2 * s.o2MgL - s.o2SourceMgL,
    }));
    const g = fitBoxModel([away, away]);
    expect(g.ok).toBe(false);
  });
});
