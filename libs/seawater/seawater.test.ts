// Seawater basics against published check values (science.md 2 and its check-value table).
import { describe, expect, it } from 'vitest';
import {
  densityEos80,
  densityEos80T68,
  depthFromPressure,
  depthUnesco,
  gravity,
  mgLToUmolKg,
  o2SaturationPct,
  o2SolubilityAtPressureUmolKg,
  o2SolubilityUmolKg,
  recompensateO2Salinity,
  umolKgToMgL,
} from './index.js';

describe('EOS-80 one-atmosphere density', () => {
  it('reproduces the check value 1023.343 kg m-3 at S 35, t68 25 degC (Millero & Poisson 1981; from memory)', () => {
    expect(densityEos80T68(35, 25)).toBeCloseTo(1023.343, 3);
  });
  it('gives pure water 999.842594 kg m-3 at 0 degC (the rho_w constant of EOS-80)', () => {
    expect(densityEos80(0, 0)).toBeCloseTo(999.842594, 6);
  });
  it('grows with salinity and falls with temperature in reef water (common practice)', () => {
    expect(densityEos80(36, 27)).toBeGreaterThan(densityEos80(35, 27));
    expect(densityEos80(35, 30)).toBeLessThan(densityEos80(35, 25));
  });
});

describe('gravity and depth', () => {
  it('matches the latitude formula at the equator and the pole (Fofonoff & Millard 1983)', () => {
    expect(gravity(0)).toBeCloseTo(9.780318, 6);
    expect(gravity(90)).toBeCloseTo(9.780318 * (1 + 5.2788e-3 + 2.36e-5), 9);
    expect(gravity()).toBe(9.80665);
  });
  it('reproduces the UNESCO depth check value 9712.653 m at 10000 dbar, 30 deg (Fofonoff & Millard 1983)', () => {
    expect(depthUnesco(10000, 30)).toBeCloseTo(9712.653, 3);
  });
  it('converts 1 dbar of sea pressure to ~0.99 m in reef water and adds the sensor height', () => {
    const rho = densityEos80(35, 27);
    const h = depthFromPressure(10.1325 + 1, 10.1325, rho, 9.80665, 0.2);
    expect(h).toBeCloseTo(0.2 + 1e4 / (rho * 9.80665), 12);
    expect(h).toBeGreaterThan(1.19);
    expect(h).toBeLessThan(1.2);
  });
});

describe('O2 solubility (Garcia & Gordon 1992)', () => {
  it('reproduces the check value 274.610 umol/kg at S 35, t 10 degC', () => {
    expect(o2SolubilityUmolKg(35, 10)).toBeCloseTo(274.61, 2);
  });
  it('is lower in warm salty water: ~200 umol/kg at S 35, 27 degC (common practice)', () => {
    const c = o2SolubilityUmolKg(35, 27);
    expect(c).toBeGreaterThan(195);
    expect(c).toBeLessThan(210);
  });
  it('equals the 1 atm value at P = 1 and scales nearly with P - pw', () => {
    expect(o2SolubilityAtPressureUmolKg(35, 25, 1)).toBeCloseTo(o2SolubilityUmolKg(35, 25), 10);
    const ratio = o2SolubilityAtPressureUmolKg(35, 25, 0.98) / o2SolubilityUmolKg(35, 25);
    expect(ratio).toBeGreaterThan(0.975);
    expect(ratio).toBeLessThan(0.98);
  });
  it('gives 100 % at equilibrium', () => {
    expect(o2SaturationPct(o2SolubilityUmolKg(34, 28), 34, 28)).toBeCloseTo(100, 10);
  });
});

describe('O2 units and re-compensation', () => {
  it('maps the 2 mg/L hypoxia limit to ~61 umol/kg at S 35, 25-30 degC (science.md 8)', () => {
    for (const t of [25, 30]) {
      const v = mgLToUmolKg(2, densityEos80(35, t));
      expect(v).toBeGreaterThan(60.5);
      expect(v).toBeLessThan(61.3);
    }
  });
  it('round-trips mg/L and umol/kg', () => {
    const rho = densityEos80(35, 27);
    expect(umolKgToMgL(mgLToUmolKg(6.1, rho), rho)).toBeCloseTo(6.1, 12);
  });
  it('re-compensates an optode set to S 0 downwards by ~18-20 % at S 35 (Bittig et al. 2018; common practice)', () => {
    const f = recompensateO2Salinity(1, 0, 35, 25);
    expect(f).toBeLessThan(0.84);
    expect(f).toBeGreaterThan(0.8);
    // and it is consistent with the solubility's own salinity dependence per litre (combined vs B&K fit)
    const solRatio =
      (o2SolubilityUmolKg(35, 25) * densityEos80(35, 25)) / (o2SolubilityUmolKg(0, 25) * densityEos80(0, 25));
    expect(Math.abs(f - solRatio) / solRatio).toBeLessThan(0.01);
  });
  it('is the identity when the setting equals the salinity', () => {
    expect(recompensateO2Salinity(211.3, 34.2, 34.2, 27)).toBe(211.3);
  });
});
