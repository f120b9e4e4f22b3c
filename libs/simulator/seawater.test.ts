import { describe, expect, it } from 'vitest';
import { densityKgM3, o2SolubilityUmolKg, o2UmolKgToMgL, optodeSalinityFactor } from './seawater.js';

describe('seawater basics', () => {
  it('EOS-80 density at S 35, t 25', () => {
    // 1023.343 kg m-3 (EOS-80, Millero & Poisson 1981, science spec check values).
    expect(densityKgM3(35, 25 / 1.00024)).toBeCloseTo(1023.343, 2);
  });
  it('oxygen solubility at S 35, t 10', () => {
    // 274.610 umol/kg (Garcia & Gordon 1992, Benson & Krause fit).
    expect(o2SolubilityUmolKg(35, 10)).toBeCloseTo(274.61, 2);
  });
  it('2 mg/L is about 61 umol/kg in warm seawater', () => {
    // 62.5 umol/L, about 61 umol/kg at S 35 and 25-30 degC (science spec 8).
    expect(o2UmolKgToMgL(61, 1022)).toBeCloseTo(1.995, 2);
  });
  it('an optode set to S = 0 in seawater reads high by the solubility ratio', () => {
    // Freshwater O2* exceeds seawater O2* by ~ 20-25 % at 28 degC (Garcia & Gordon 1992, from memory).
    const f = optodeSalinityFactor(35, 0, 28);
    expect(1 / f).toBeGreaterThan(1.18);
    expect(1 / f).toBeLessThan(1.27);
    expect(f).toBeCloseTo(o2SolubilityUmolKg(35, 28) / o2SolubilityUmolKg(0, 28), 4);
  });
});
