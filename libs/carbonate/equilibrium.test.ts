import { describe, expect, it } from 'vitest';
import { equilibriumConstants, k0 } from './index.js';

// Check values at S 35, t 25 degC, P 0: Dickson, Sabine & Christian (2007), Guide to Best Practices for Ocean
// CO2 Measurements (PICES Spec. Publ. 3), chapter 5; Mucci (1983) for Ksp.
describe('equilibrium constants at S 35, t 25 degC (handbook check values)', () => {
  const c = equilibriumConstants(35, 25, 0);
  it('K0 Weiss 1974: ln K0 = -3.5617 (Dickson et al. 2007)', () => {
    expect(Math.log(c.k0)).toBeCloseTo(-3.5617, 4);
    expect(k0(35, 25)).toBe(c.k0);
  });
  it('K1, K2 Lueker 2000: log10 K1 = -5.8472, log10 K2 = -8.9660 (Dickson et al. 2007)', () => {
    expect(Math.log10(c.k1)).toBeCloseTo(-5.8472, 4);
    expect(Math.log10(c.k2)).toBeCloseTo(-8.966, 4);
  });
  it('KB Dickson 1990: ln KB = -19.7964 (Dickson et al. 2007)', () => {
    expect(Math.log(c.kb)).toBeCloseTo(-19.7964, 4);
  });
  it('KW Millero 1995: ln KW = -30.434 (Dickson et al. 2007)', () => {
    expect(Math.log(c.kw)).toBeCloseTo(-30.434, 3);
  });
  it('KS Dickson 1990 and KF Perez & Fraga 1987, free scale: ln KS = -2.30, ln KF = -6.09 (Dickson et al. 2007)', () => {
    expect(Math.log(c.ks)).toBeCloseTo(-2.3, 2);
    expect(Math.log(c.kf)).toBeCloseTo(-6.09, 2);
  });
  it('Ksp Mucci 1983: log10 Ksp calcite = -6.3693, aragonite = -6.1883 (Mucci 1983)', () => {
    expect(Math.log10(c.kspCa)).toBeCloseTo(-6.3693, 4);
    expect(Math.log10(c.kspAr)).toBeCloseTo(-6.1883, 4);
  });
  it('totals: BT 432.6 (Lee 2010), 415.7 (Uppstrom 1974), ST 0.02824, FT 6.83e-5, Ca 0.01028 mol/kg (docs/methods/carbonate.md 3.1)', () => {
    expect(c.bt * 1e6).toBeCloseTo(432.6, 10);
    expect(equilibriumConstants(35, 25, 0, { boron: 'uppstrom1974' }).bt * 1e6).toBeCloseTo(415.7, 10);
    expect(c.st).toBeCloseTo(0.02824, 5);
    expect(c.ft * 1e5).toBeCloseTo(6.83, 2);
    expect(c.ca).toBeCloseTo(0.01028, 4);
  });
  it('no fit is out of range at S 35, t 25; t 36 flags K1K2 and KF (published ranges)', () => {
    expect(c.rangeMask).toBe(0);
    expect(equilibriumConstants(35, 36, 0).rangeMask).not.toBe(0);
  });
  it('rejects an unknown option name with the valid list', () => {
    expect(() => equilibriumConstants(35, 25, 0, { carbonicConstants: 'nonsense' as 'lueker2000' })).toThrow(
      /lueker2000/,
    );
  });
  it('pressure raises K1 (dV < 0): at 1000 dbar, 25 degC, ln(K1_P/K1_0) = 0.0899 on the SWS scale (evaluated from docs/methods/carbonate.md 3.2)', () => {
    const p = equilibriumConstants(35, 25, 1000);
    // 100 bar: -dV P/RT + 0.5 dK P^2/RT with dV = -25.5 + 0.1271*25, dK = (-3.08 + 0.0877*25)e-3.
    const dV = -25.5 + 0.1271 * 25;
    const dK = (-3.08 + 0.0877 * 25) * 1e-3;
    const expected = ((-dV + 0.5 * dK * 100) * 100) / (83.14462618 * 298.15);
    const sws = Math.log((p.k1 * p.swsPerTotal) / (c.k1 * c.swsPerTotal));
    expect(sws).toBeCloseTo(expected, 12);
    expect(expected).toBeCloseTo(0.0899, 4);
  });
});
