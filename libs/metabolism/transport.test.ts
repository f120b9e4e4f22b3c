// The segment's transport from the current station (docs/methods/metabolism.md 6.1, "Transport"): the budget's
// velocity is U_c h_c / h, so a current station deeper (or shallower) than the segment's mean depth carries the
// same volume flux per metre as the segment.
import { describe, expect, it } from 'vitest';
import { forwardDownstream } from './forward.js';
import {
  computeTransectFlux,
  makeTransectParams,
  type StationWindowMean,
  type TransectWindow,
} from './index.js';
import { transportScale } from './transect-flux.js';

const T0 = Date.UTC(2026, 5, 1, 12);
const params = makeTransectParams({ lengthM: 170, bearingDeg: 270 });

function st(o2: number, depthM: number): StationWindowMean {
  return { tempC: 27, salinity: 35, o2UmolKg: o2, depthM, flag: 1 };
}

describe('transport of a transect from its current station (continuity)', () => {
  it('transportScale: h_c / h, and 1 without a usable depth (algebra)', () => {
    expect(transportScale(1.5, 1.35)).toBeCloseTo(1.5 / 1.35, 15);
    expect(transportScale(undefined, 1.35)).toBe(1);
    expect(transportScale(0, 1.35)).toBe(1);
    expect(transportScale(Number.NaN, 1.35)).toBe(1);
  });

  it('a current station at the deep end: U = U_c h_c / h in the budget, the residence time and the record', () => {
    // Flat 1.2 m, back reef 1.5 m (mean 1.35 m); the back reef's ADCP measures U_c = q / 1.5 with q = 0.09 m2/s.
    const q = 0.09;
    const w: TransectWindow = {
      tCentreMs: T0,
      up: st(200, 1.2),
      down: st(206, 1.5),
      eastMS: -q / 1.5,
      northMS: 0,
    };
    const without = computeTransectFlux(w, undefined, params);
    const withDepth = computeTransectFlux({ ...w, currentDepthM: 1.5 }, undefined, params);
    expect(withDepth.uMS).toBeCloseTo(q / 1.35, 12);
    expect(withDepth.residenceMin).toBeCloseTo(170 / (q / 1.35) / 60, 9);
    expect(withDepth.depthM).toBeCloseTo(1.35, 12);
    // No air-sea exchange (no wind) and no storage: NCP = rho q dO2 / L, the ratio of the two is h_c / h.
    expect(withDepth.ncpMmolM2H! / without.ncpMmolM2H!).toBeCloseTo(1.5 / 1.35, 9);
    expect(withDepth.ncpMmolM2H!).toBeCloseTo(withDepth.rhoKgM3 * q * (6 / 170) * 3.6, 9);
    // The velocity's sigma scales with it.
    expect(withDepth.sigmaUMS / without.sigmaUMS).toBeCloseTo(1.5 / 1.35, 12);
  });

  it('round trip: a forward model run at the transport q gives back its NCP from the current station (h_c != h)', () => {
    const q = 0.08;
    const h = 1.35;
    const f = forwardDownstream({
      up: { tempC: 27, salinity: 35, o2UmolKg: 195, taUmolKg: 2300, dicUmolKg: 1980 },
      downTempC: 27,
      downSalinity: 35,
      ncpMmolM2H: -19,
      necMmolM2H: 2,
      pq: 1,
      uMS: q / h,
      depthM: h,
      lengthM: 170,
      baroHpa: 1013.25,
      airSea: { kind: 'fixed', fasO2MmolM2H: 0, fasCo2MmolM2H: 0 },
    });
    if (!f.ok) throw new Error(f.reason);
    const r = computeTransectFlux(
      {
        tCentreMs: T0,
        up: st(195, 1.2),
        down: st(f.o2UmolKg, 1.5),
        eastMS: -q / 1.5,
        northMS: 0,
        currentDepthM: 1.5,
      },
      undefined,
      params,
    );
    expect(r.ncpMmolM2H!).toBeCloseTo(-19, 6);
  });
});
