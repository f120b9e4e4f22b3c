import { describe, expect, it } from 'vitest';
import { fitCalcificationOmega } from './omega.js';
import { mean, sd, seeded } from './test-helpers.js';

describe('NEC against aragonite saturation', () => {
  const omegas = Array.from({ length: 40 }, (_, i) => 2.8 + (1.6 * i) / 39);

  it('exact NEC = -20 + 8 Omega gives slope 8, intercept -20, Omega_0 2.5 (analytic)', () => {
    const f = fitCalcificationOmega(omegas.map((o) => ({ omegaAr: o, rate: -20 + 8 * o, sigma: 1 })));
    if (!f.ok) throw new Error(f.reason);
    expect(f.slopeMmolM2HPerOmega).toBeCloseTo(8, 10);
    expect(f.interceptMmolM2H).toBeCloseTo(-20, 9);
    expect(f.omega0).toBeCloseTo(2.5, 10);
  });

  it('the sigma of Omega_0 by first-order propagation matches 400 noisy replicates within 15 %', () => {
    const r = seeded(21);
    const o0: number[] = [];
    const se: number[] = [];
    for (let k = 0; k < 400; k++) {
      const f = fitCalcificationOmega(
        omegas.map((o) => ({ omegaAr: o, rate: -20 + 8 * o + 2 * r.normal(), sigma: 2 })),
        { loss: 'linear' },
      );
      if (!f.ok || f.omega0 === null) throw new Error('fit failed');
      o0.push(f.omega0);
      se.push(f.se.omega0);
    }
    expect(Math.abs(mean(o0) - 2.5)).toBeLessThan(0.02);
    expect(sd(o0) / mean(se)).toBeGreaterThan(0.85);
    expect(sd(o0) / mean(se)).toBeLessThan(1.15);
  });

  it('refuses too few windows and too narrow a range of saturation', () => {
    const few = fitCalcificationOmega(omegas.slice(0, 5).map((o) => ({ omegaAr: o, rate: o, sigma: 1 })));
    expect(few.ok ? '' : few.code).toBe('REEFD_DAILY_TOO_FEW_WINDOWS');
    const narrow = fitCalcificationOmega(
      omegas.map((o) => ({ omegaAr: 3.4 + (o - 2.8) / 10, rate: o, sigma: 1 })),
    );
    expect(narrow.ok ? '' : narrow.code).toBe('REEFD_DAILY_OMEGA_SPREAD');
    expect(narrow.ok ? '' : narrow.reason).toContain('spans 0.16');
  });

  it('no Omega_0 when calcification falls with saturation', () => {
    const f = fitCalcificationOmega(omegas.map((o) => ({ omegaAr: o, rate: 10 - o, sigma: 1 })));
    if (!f.ok) throw new Error(f.reason);
    expect(f.slopeMmolM2HPerOmega).toBeCloseTo(-1, 10);
    expect(f.omega0).toBeNull();
  });
});
