import { describe, it, expect } from 'vitest';
import { solveCarbonate } from '../carbonate/index.js';
import { forwardDownstream, type ForwardStation } from './index.js';

const up: ForwardStation = (() => {
  const r = solveCarbonate({ salinity: 35, tempC: 27, taUmolKg: 2300, pco2Uatm: 400 });
  if (!r.ok) throw new Error(r.reason);
  return { tempC: 27, salinity: 35, o2UmolKg: 200, taUmolKg: 2300, dicUmolKg: r.dicUmolKg };
})();

/** Downstream pCO2 at reef-typical midday and night rates (mmol m-2 h-1), no air-sea exchange. */
function swing(u: number, depthM = 1, lengthM = 350): number {
  const day = forwardDownstream({ up, ncpMmolM2H: 25, necMmolM2H: 8, pq: 1, uMS: u, depthM, lengthM });
  const night = forwardDownstream({ up, ncpMmolM2H: -8, necMmolM2H: 2, pq: 1, uMS: u, depthM, lengthM });
  if (!day.ok || !night.ok) throw new Error('forward failed');
  return night.pco2Uatm - day.pco2Uatm;
}

describe('forward model (docs/methods/metabolism.md 6.4)', () => {
  it('O2 rise is NCP L/(rho h U) with no exchange (algebra)', () => {
    const f = forwardDownstream({
      up,
      ncpMmolM2H: 18,
      necMmolM2H: 5,
      pq: 1.1,
      uMS: 0.05,
      depthM: 1.2,
      lengthM: 350,
    });
    expect(f.ok).toBe(true);
    if (!f.ok) return;
    const q = 18 / 3.6 / (f.rhoKgM3 * 1.2);
    expect(f.o2UmolKg - 200).toBeCloseTo((q * 350) / 0.05, 10);
    // TA falls by 2 NEC, DIC by NCP/PQ + NEC, per unit of rho h U / L (salinity constant).
    expect(up.taUmolKg - f.taUmolKg).toBeCloseTo(((2 * 5) / 3.6 / (f.rhoKgM3 * 1.2)) * 7000, 10);
    expect(up.dicUmolKg - f.dicUmolKg).toBeCloseTo(((18 / 1.1 + 5) / 3.6 / (f.rhoKgM3 * 1.2)) * 7000, 10);
    expect(f.residenceMin).toBeCloseTo(7000 / 60, 10);
  });

  it('photosynthesis lowers and calcification raises downstream pCO2 (Frankignoulle et al. 1994, common practice)', () => {
    const base = { up, pq: 1, uMS: 0.05, depthM: 1, lengthM: 350 };
    const p0 = forwardDownstream({ ...base, ncpMmolM2H: 0, necMmolM2H: 0 });
    const pP = forwardDownstream({ ...base, ncpMmolM2H: 20, necMmolM2H: 0 });
    const pC = forwardDownstream({ ...base, ncpMmolM2H: 0, necMmolM2H: 10 });
    expect(p0.ok && pP.ok && pC.ok).toBe(true);
    if (!p0.ok || !pP.ok || !pC.ok) return;
    expect(p0.pco2Uatm).toBeCloseTo(400, 5); // round trip through TA + DIC (solver tolerance 1e-10 pH)
    expect(pP.pco2Uatm).toBeLessThan(p0.pco2Uatm);
    expect(pC.pco2Uatm).toBeGreaterThan(p0.pco2Uatm);
  });

  it('diurnal pCO2 swing on a ~1 m flat with a few cm/s is of order 150 uatm and shrinks as U grows', () => {
    // Common practice: reef-flat pCO2 swings by about 100-300 uatm a day at reef-typical rates; our rates
    // (NCP +25/-8, NEC 8/2 mmol m-2 h-1) on h = 1 m, L = 350 m, U = 4 cm/s.
    const s4 = swing(0.04);
    expect(s4).toBeGreaterThan(75);
    expect(s4).toBeLessThan(300);
    const s8 = swing(0.08);
    const s16 = swing(0.16);
    expect(s8).toBeLessThan(s4);
    expect(s16).toBeLessThan(s8);
    // Doubling U halves the residence time and, to first order, the swing.
    expect(s8 / s4).toBeGreaterThan(0.4);
    expect(s8 / s4).toBeLessThan(0.6);
  });

  it('storage form relaxes to the steady state when the forcing is constant (docs/methods/metabolism.md 6.4)', () => {
    const base = { up, ncpMmolM2H: 20, necMmolM2H: 6, pq: 1, uMS: 0.05, depthM: 1, lengthM: 350 };
    const steady = forwardDownstream(base);
    expect(steady.ok).toBe(true);
    if (!steady.ok) return;
    let down: ForwardStation = { ...up };
    for (let k = 0; k < 200; k++) {
      const f = forwardDownstream({ ...base, previous: { dtS: 600, up, down } });
      if (!f.ok) throw new Error('forward failed');
      down = { ...up, o2UmolKg: f.o2UmolKg, taUmolKg: f.taUmolKg, dicUmolKg: f.dicUmolKg };
    }
    expect(down.o2UmolKg).toBeCloseTo(steady.o2UmolKg, 6);
    expect(down.dicUmolKg).toBeCloseTo(steady.dicUmolKg, 6);
  });

  it('reports a carbonate failure for impossible fluxes with a stable code', () => {
    const f = forwardDownstream({
      up,
      ncpMmolM2H: 0,
      necMmolM2H: 2000,
      pq: 1,
      uMS: 0.02,
      depthM: 0.5,
      lengthM: 350,
    });
    expect(f.ok).toBe(false);
    if (!f.ok) expect(f.code).toBe('REEFD_METABOLISM_CARBONATE_FAILED');
  });
});
