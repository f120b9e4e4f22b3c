import { describe, expect, it } from 'vitest';
import {
  crossReef,
  CREST_CURRENT_RANGE_M_S,
  FLAT_CURRENT_RANGE_M_S,
  ORNEN_HYDRAULICS,
  shoalingCoefficient,
  wavenumber,
} from './hydro.js';

const state = (hrms: number, tide: number) =>
  crossReef({
    hrmsOffshoreM: hrms,
    tpS: 8 + (4 * (hrms - 0.5)) / 1.5,
    stillDepthForeM: 12 + tide,
    stillDepthCrestM: 0.95 + tide,
    stillDepthFlatM: 1.15 + tide,
    stillDepthBackM: 1.45 + tide,
  });

describe('linear wave theory', () => {
  it('gives the tabulated wavelength of a 10 s wave in 10 m of water', () => {
    // L = 92.3 m for T = 10 s, h = 10 m (linear dispersion tables, common practice).
    expect((2 * Math.PI) / wavenumber(0.1, 10)).toBeCloseTo(92.3, 0);
  });
  it('shoals towards 1 in deep water and has the 0.91 minimum at intermediate depth', () => {
    // Ks -> 1 as h/L0 -> 0.5 and min(Ks) ~ 0.913 near h/L0 = 0.15 (common practice).
    expect(shoalingCoefficient(8, 200)).toBeCloseTo(1, 3);
    const l0 = (9.80665 * 100) / (2 * Math.PI);
    expect(shoalingCoefficient(10, 0.15 * l0)).toBeCloseTo(0.913, 2);
  });
});

describe('cross-reef balance', () => {
  it('the flat current rises with the offshore RMS wave height', () => {
    for (const tide of [-0.4, 0, 0.4]) {
      let last = -Infinity;
      for (let h = 0.5; h <= 2.0001; h += 0.25) {
        const u = state(h, tide).uFlatMS;
        expect(u).toBeGreaterThan(last);
        last = u;
      }
    }
  });
  it('keeps flat and crest currents in the trade envelope over the whole wave climate', () => {
    // Flat 0.01-0.26 m/s, crest 0.1-0.5 m/s (common practice).
    for (let h = 0.5; h <= 2.0001; h += 0.1) {
      for (const tide of [-0.5, -0.25, 0, 0.25, 0.5]) {
        const s = state(h, tide);
        expect(s.uFlatMS).toBeGreaterThanOrEqual(FLAT_CURRENT_RANGE_M_S[0]);
        expect(s.uFlatMS).toBeLessThanOrEqual(FLAT_CURRENT_RANGE_M_S[1]);
        expect(s.uCrestMS).toBeGreaterThanOrEqual(CREST_CURRENT_RANGE_M_S[0]);
        expect(s.uCrestMS).toBeLessThanOrEqual(CREST_CURRENT_RANGE_M_S[1]);
      }
    }
  });
  it('limits the flat waves by depth, H = gamma h with gamma 0.4-0.5, once the waves break', () => {
    const s = state(2.0, 0);
    const hFlat = s.depthFlatM;
    // Saturated surf: Hrms/h approaches gamma from below (Thornton & Guza 1983 form, gamma 0.45 here).
    expect(s.hrmsFlatM / hFlat).toBeGreaterThan(0.4);
    expect(s.hrmsFlatM / hFlat).toBeLessThanOrEqual(ORNEN_HYDRAULICS.gammaFlat);
  });
  it('sets the water up behind the crest, more for bigger waves', () => {
    // Radiation-stress setup of a few cm to a few dm on reef flats (common practice).
    const small = state(0.8, 0).setupFlatM;
    const big = state(2.0, 0).setupFlatM;
    expect(small).toBeGreaterThan(0.01);
    expect(big).toBeGreaterThan(small);
    expect(big).toBeLessThan(0.5);
  });
  it('conserves volume: crest and back-reef velocities carry the flat flux', () => {
    const s = state(1.2, 0);
    expect(s.uBackMS * s.depthBackM).toBeCloseTo(s.qM2S, 10);
    expect(s.uFlatMS * s.depthFlatM).toBeCloseTo(s.qM2S, 10);
    expect(Math.abs(s.nextSetupM - s.setupFlatM)).toBeLessThan(1e-3);
  });
});
