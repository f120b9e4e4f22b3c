import { describe, expect, it } from 'vitest';
import {
  densityEos80,
  depthFromPressure,
  GG92_COMBINED_ML_L,
  gravity,
  o2MgLFromUmolKg,
  o2MgLFromUmolL,
  o2SatPct,
  o2SolubilityAtPressureUmolKg,
  o2SolubilityMlL,
  o2SolubilityUmolKg,
  o2UmolKgFromMgL,
  o2UmolKgFromSatPct,
  o2UmolKgFromUmolL,
  o2UmolLFromMgL,
  o2UmolLFromMlL,
  o2UmolLFromUmolKg,
  recompensateO2Salinity,
  unescoDepth,
  vapourPressureAtm,
} from './index.js';

describe('density (EOS-80 one atmosphere)', () => {
  it('1023.343 kg m-3 at S 35, t68 25 degC (Millero & Poisson 1981 check value)', () => {
    expect(densityEos80(35, 25 / 1.00024)).toBeCloseTo(1023.343, 3);
  });
  it('pure water 999.842594 kg m-3 at 0 degC (EOS-80 rho_w constant term)', () => {
    expect(densityEos80(0, 0)).toBe(999.842594);
  });
});

describe('gravity and depth', () => {
  it('g = 9.780318 at the equator and 9.832177 at the pole (Fofonoff & Millard 1983 formula); standard 9.80665 without latitude', () => {
    expect(gravity(0)).toBe(9.780318);
    expect(gravity(90)).toBeCloseTo(9.832177, 6);
    expect(gravity()).toBe(9.80665);
  });
  it('UNESCO depth 9712.653 m at 10000 dbar, latitude 30 (Fofonoff & Millard 1983 check value)', () => {
    expect(unescoDepth(10000, 30)).toBeCloseTo(9712.653, 3);
  });
  it('h = z_s + 1e4 (p - p_atm)/(rho g): 10 dbar of sea pressure in rho 1023.343 at standard g is 9.9646 m above a 0.2 m sensor (docs/methods/seawater.md 2.2)', () => {
    const h = depthFromPressure(10 + 10.1325, 1013.25, 1023.343, 0.2);
    expect(h).toBeCloseTo(0.2 + 1e5 / (1023.343 * 9.80665), 12);
    expect(h - 0.2).toBeCloseTo(9.9646, 4);
    // 1 hPa of barometer error is about 1 cm (docs/methods/seawater.md 2.2).
    expect(h - depthFromPressure(10 + 10.1325, 1014.25, 1023.343, 0.2)).toBeCloseTo(0.00996, 5);
  });
});

describe('oxygen', () => {
  it('O2* = 274.610 umol/kg and 6.315 mL/L at S 35, t 10 degC (Garcia & Gordon 1992 check values, Benson & Krause fits)', () => {
    expect(o2SolubilityUmolKg(35, 10)).toBeCloseTo(274.61, 3);
    expect(o2SolubilityMlL(35, 10)).toBeCloseTo(6.315, 3);
  });
  it('the combined fit gives 6.3 mL/L too at S 35, 10 degC (Garcia & Gordon 1992: the fits agree within 0.5 %)', () => {
    expect(Math.abs(o2SolubilityMlL(35, 10, GG92_COMBINED_ML_L) / o2SolubilityMlL(35, 10) - 1)).toBeLessThan(
      0.005,
    );
  });
  it('pressure correction is exact at 1 atm and near-proportional to P - pw (Benson & Krause 1984)', () => {
    expect(o2SolubilityAtPressureUmolKg(35, 25, 1)).toBeCloseTo(o2SolubilityUmolKg(35, 25), 12);
    const pw = vapourPressureAtm(35, 25);
    const ratio = o2SolubilityAtPressureUmolKg(35, 25, 0.98) / o2SolubilityUmolKg(35, 25);
    expect(ratio).toBeCloseTo((0.98 - pw) / (1 - pw), 4);
  });
  it('unit factors: 1 mg/L = 31.2512 umol/L; 1 mL/L = 44.6596 umol/L (docs/methods/seawater.md 2.3)', () => {
    expect(o2UmolLFromMgL(1)).toBeCloseTo(31.2512, 4);
    expect(o2MgLFromUmolL(31.2512)).toBeCloseTo(1, 5);
    expect(o2UmolLFromMlL(1)).toBe(44.6596);
  });
  it('umol/kg <-> umol/L <-> mg/L round-trip with rho(S, t) (docs/methods/seawater.md 2.3)', () => {
    const rho = densityEos80(35, 28);
    expect(o2UmolKgFromUmolL(200, 35, 28)).toBeCloseTo((200 * 1000) / rho, 12);
    expect(o2UmolLFromUmolKg(o2UmolKgFromUmolL(200, 35, 28), 35, 28)).toBeCloseTo(200, 10);
    expect(o2UmolKgFromMgL(o2MgLFromUmolKg(180, 35, 28), 35, 28)).toBeCloseTo(180, 10);
    // 2.0 mg/L (the low-oxygen alert) is 61.13 umol/kg in S 35, 28 degC water (62.5 umol/L over rho 1.0223).
    expect(o2UmolKgFromMgL(2, 35, 28)).toBeCloseTo(61.13, 2);
  });
  it('% saturation: 100 % is O2*; back-conversion is exact (docs/methods/seawater.md 2.3)', () => {
    expect(o2SatPct(o2SolubilityUmolKg(35, 27), 35, 27)).toBeCloseTo(100, 10);
    expect(o2UmolKgFromSatPct(o2SatPct(150, 35, 27, 0.995), 35, 27, 0.995)).toBeCloseTo(150, 10);
  });
  it('salinity re-compensation: S_set 0 -> S 35 multiplies by O2*(35)/O2*(0) of the fit, 0.80000 at 10 degC (combined fit)', () => {
    const f = recompensateO2Salinity(1, 10, 35, 0);
    expect(f).toBeCloseTo(
      o2SolubilityMlL(35, 10, GG92_COMBINED_ML_L) / o2SolubilityMlL(0, 10, GG92_COMBINED_ML_L),
      12,
    );
    expect(f).toBeCloseTo(0.8, 4);
    // No change when the setting is the measured salinity; the inverse undoes it.
    expect(recompensateO2Salinity(250, 27, 35, 35)).toBe(250);
    expect(recompensateO2Salinity(recompensateO2Salinity(250, 27, 34, 0), 27, 0, 34)).toBeCloseTo(250, 10);
  });
});
