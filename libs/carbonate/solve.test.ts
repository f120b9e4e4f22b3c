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

describe('helpers', () => {
  it('Takahashi et al. (1993) temperature coefficient: 400 uatm at +1 degC -> 417.28 uatm (0.0423 per degC)', async () => {
    const { pco2AtTemperatureTakahashi } = await import('./index.js');
    expect(pco2AtTemperatureTakahashi(400, 25, 26)).toBeCloseTo(400 * Math.exp(0.0423), 12);
    expect(pco2AtTemperatureTakahashi(400, 25, 26)).toBeCloseTo(417.28, 2);
  });
  it('xCO2 400 ppm at 1013.25 hPa, S 35, t 25 is 387.74 uatm wet (Weiss & Price 1980 vapour pressure)', async () => {
    const { pco2FromXco2, xco2FromPco2 } = await import('./index.js');
    expect(pco2FromXco2(400, 1013.25, 35, 25)).toBeCloseTo(387.74, 2);
    expect(xco2FromPco2(pco2FromXco2(415, 1005, 35, 28), 1005, 35, 28)).toBeCloseTo(415, 10);
  });
  it('pH scales: free > total > seawater, by log10(1 + ST/KS) and log10 of the fluoride term (docs/methods/carbonate.md 3.3)', async () => {
    const { equilibriumConstants, phTotalToFree, phFreeToTotal, phTotalToSws, phSwsToTotal } =
      await import('./index.js');
    const c = equilibriumConstants(35, 25, 0);
    expect(phTotalToFree(c, 8) - 8).toBeCloseTo(Math.log10(1 + c.st / c.ks), 14);
    expect(phTotalToFree(c, 8) - 8).toBeCloseTo(0.1077, 3);
    expect(8 - phTotalToSws(c, 8)).toBeCloseTo(0.0101, 3);
    expect(phFreeToTotal(c, phTotalToFree(c, 7.9))).toBeCloseTo(7.9, 14);
    expect(phSwsToTotal(c, phTotalToSws(c, 7.9))).toBeCloseTo(7.9, 14);
  });
  it('flags 3 with a note when a fit is used outside its range (t 36 > 35 for Lueker 2000)', () => {
    const r = solveCarbonate({ salinity: 35, tempC: 36, taUmolKg: 2300, pco2Uatm: 400 });
    expect(r.ok && r.flag).toBe(3);
    expect(r.ok && r.notes.join(' ')).toMatch(/Lueker et al\. \(2000\)/);
  });
});
