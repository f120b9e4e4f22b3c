import { describe, expect, it } from 'vitest';
import { chi2Quantile, lnGamma, regularizedGamma } from './chi2.js';

describe('lnGamma (Lanczos)', () => {
  it('matches exact values: Gamma(0.5) = sqrt(pi), Gamma(n) = (n-1)! (algebra)', () => {
    expect(lnGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 13);
    expect(lnGamma(1)).toBeCloseTo(0, 13);
    expect(lnGamma(10)).toBeCloseTo(Math.log(362880), 12);
    expect(lnGamma(171)).toBeCloseTo(706.5730622457874, 9); // ln(170!) (common practice: 170! ~ 7.257e306)
  });
});

describe('regularizedGamma', () => {
  it('P(1, x) = 1 - exp(-x) and P(0.5, x) = erf(sqrt x) (algebra)', () => {
    for (const x of [0.01, 0.5, 1, 2, 5, 20]) {
      const { p, q } = regularizedGamma(1, x);
      expect(p).toBeCloseTo(1 - Math.exp(-x), 14);
      expect(q / Math.exp(-x)).toBeCloseTo(1, 12);
    }
    // erf(1) = 0.8427007929497149 (common practice, tabulated)
    expect(regularizedGamma(0.5, 1).p).toBeCloseTo(0.8427007929497149, 13);
  });
});

describe('chi2Quantile', () => {
  it('nu = 2 is exponential: chi2_2(p) = -2 ln(1 - p) (algebra)', () => {
    for (const p of [0.001, 0.025, 0.5, 0.975, 0.999]) {
      expect(chi2Quantile(p, 2) / (-2 * Math.log(1 - p))).toBeCloseTo(1, 12);
    }
  });

  it('tabulated values: chi2_1(0.95) = 3.841, chi2_10(0.975) = 20.483 (common statistics tables)', () => {
    expect(chi2Quantile(0.95, 1)).toBeCloseTo(3.841458820694124, 10); // 1.959963984540054^2
    expect(chi2Quantile(0.975, 10)).toBeCloseTo(20.483, 3);
    expect(chi2Quantile(0.025, 10)).toBeCloseTo(3.247, 3);
  });

  it('round trip P(nu/2, x/2) = p over nu 0.5..5000', () => {
    for (const nu of [0.5, 1, 3, 7.7, 40, 300, 5000]) {
      for (const p of [1e-6, 0.025, 0.3, 0.7, 0.975, 1 - 1e-6]) {
        const x = chi2Quantile(p, nu);
        const { p: pp, q } = regularizedGamma(nu / 2, x / 2);
        if (p < 0.5) expect(Math.abs(pp / p - 1)).toBeLessThan(1e-11);
        else expect(Math.abs(q / (1 - p) - 1)).toBeLessThan(1e-9);
      }
    }
  });

  it('rejects p outside (0, 1) and nu <= 0', () => {
    expect(() => chi2Quantile(0, 3)).toThrow(/REEFD_WAVES_CHI2_DOMAIN/);
    expect(() => chi2Quantile(0.5, 0)).toThrow(/^REEFD_WAVES_CHI2_DOMAIN: got p=0.5, nu=0/);
  });
});
