import { describe, it, expect } from 'vitest';
import { airSeaFluxes, pathMeanWeight } from './index.js';

describe('transect-mean air-sea terms', () => {
  it('path-mean weight: 1/2 at a = 0, symmetric, exact steady mean (algebra)', () => {
    expect(pathMeanWeight(0)).toBe(0.5);
    expect(pathMeanWeight(1e-6)).toBeCloseTo(0.5 + 1e-6 / 12, 14);
    expect(pathMeanWeight(0.28)).toBeCloseTo(0.523303, 6);
    expect(pathMeanWeight(-0.28)).toBeCloseTo(1 - pathMeanWeight(0.28), 14);
    expect(pathMeanWeight(Number.POSITIVE_INFINITY)).toBe(1);
    // Continuous across the series switch at |a| = 1e-2.
    const jump = pathMeanWeight(1.0000001e-2) - pathMeanWeight(0.9999999e-2);
    expect(Math.abs(jump - 2e-9 / 12)).toBeLessThan(1e-14); // dw/da = 1/12 near 0
    // Mean of e^-s over [0, a] equals e^0 + w(a) (e^-a - e^0) (definition of w).
    const a = 0.7;
    expect(1 + pathMeanWeight(a) * (Math.exp(-a) - 1)).toBeCloseTo((1 - Math.exp(-a)) / a, 14);
  });

  it('no wind means no exchange; O2 flux sign follows the saturation anomaly', () => {
    const base = { tempC: 27, salinity: 35, rhoKgM3: 1023, windHeightM: 10, xco2AirPpm: 420 };
    const calm = airSeaFluxes({ ...base, o2UmolKg: 250, pco2Uatm: 500 });
    expect(calm.fasO2UmolM2S).toBe(0);
    expect(calm.fasCo2UmolM2S).toBe(0);
    const windy = airSeaFluxes({ ...base, o2UmolKg: 250, pco2Uatm: 500, windMS: 7 });
    expect(windy.fasO2UmolM2S).toBeGreaterThan(0); // supersaturated water outgasses
    expect(windy.fasCo2UmolM2S as number).toBeGreaterThan(0);
    // Air xCO2 420 ppm at 1 atm, 27 degC: wet pCO2 = 420 (1 - pw), pw ~ 0.035 atm (Weiss & Price 1980).
    expect(windy.fco2AirUatm).toBeGreaterThan(400);
    expect(windy.fco2AirUatm).toBeLessThan(408);
    const under = airSeaFluxes({ ...base, o2UmolKg: 150, pco2Uatm: 300, windMS: 7 });
    expect(under.fasO2UmolM2S).toBeLessThan(0);
    expect(under.fasCo2UmolM2S as number).toBeLessThan(0);
  });

  it('trapezoid option is the station mean; the exponential mean leans downstream for a > 0', () => {
    const base = { tempC: 27, salinity: 35, rhoKgM3: 1023, windHeightM: 10, xco2AirPpm: 420, windMS: 8 };
    const t = airSeaFluxes({
      ...base,
      o2UmolKg: 200,
      o2DownUmolKg: 240,
      o2Mean: 'trapezoid',
      residenceS: 8000,
      depthM: 1,
    });
    expect(t.o2MeanUmolKg).toBe(220);
    const e = airSeaFluxes({ ...base, o2UmolKg: 200, o2DownUmolKg: 240, residenceS: 8000, depthM: 1 });
    expect(e.o2MeanUmolKg).toBeCloseTo(200 + 40 * pathMeanWeight((e.kO2MS * 8000) / 1), 12);
    expect(e.o2MeanUmolKg).toBeGreaterThan(220);
  });
});
