import { describe, expect, it } from 'vitest';
import { solveCarbonate } from './index.js';

describe('solveCarbonate', () => {
  it('TA 2300 + pCO2 400 at S 35, t 25: pH 8.0426, DIC 1998.55 (PyCO2SYS 1.8.3.4 gives 8.04260 with its KW form)', () => {
    const r = solveCarbonate({ salinity: 35, tempC: 25, taUmolKg: 2300, pco2Uatm: 400 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.flag).toBe(1);
    expect(r.phTotal).toBeCloseTo(8.0426, 4);
    expect(r.dicUmolKg).toBeCloseTo(1998.55, 1);
    expect(r.pco2Uatm).toBeCloseTo(400, 9);
    expect(r.co2UmolKg + r.hco3UmolKg + r.co3UmolKg).toBeCloseTo(r.dicUmolKg, 9);
  });
  it('refuses anything but exactly two inputs', () => {
    const r = solveCarbonate({ salinity: 35, tempC: 25, taUmolKg: 2300 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('REEFD_CARBONATE_BAD_PAIR');
    const r2 = solveCarbonate({ salinity: 35, tempC: 25, pco2Uatm: 400, fco2Uatm: 399 });
    expect(!r2.ok && r2.code).toBe('REEFD_CARBONATE_BAD_PAIR');
  });
  it('returns NO_ROOT, not NaN, for DIC far above TA that no pH in 3-12 can balance', () => {
    const r = solveCarbonate({ salinity: 35, tempC: 25, taUmolKg: -5000, dicUmolKg: 2000 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('REEFD_CARBONATE_NO_ROOT');
  });
});
