// Property: for any reef-plausible NCP, NEC, PQ, upstream state, U, h and L, the forward model and the
// budget + inverse are inverses of each other (fast-check; the solver must find the root everywhere).
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { solveCarbonate } from '../carbonate/index.js';
import {
  computeTransectFlux,
  forwardDownstream,
  makeTransectParams,
  type StationWindowMean,
} from './index.js';

describe('forward model <-> budget and inverse round trip', () => {
  it('recovers NCP to 1e-8 relative (+1e-6) and NEC to 1e-3 mmol m-2 h-1', () => {
    fc.assert(
      fc.property(
        fc.record({
          ncp: fc.double({ min: -15, max: 40, noNaN: true }),
          nec: fc.double({ min: -3, max: 15, noNaN: true }),
          pq: fc.double({ min: 0.8, max: 1.4, noNaN: true }),
          tempC: fc.double({ min: 20, max: 32, noNaN: true }),
          salinity: fc.double({ min: 33, max: 37, noNaN: true }),
          ta: fc.double({ min: 2150, max: 2400, noNaN: true }),
          pco2: fc.double({ min: 300, max: 600, noNaN: true }),
          u: fc.double({ min: 0.02, max: 0.4, noNaN: true }),
          h: fc.double({ min: 0.3, max: 3, noNaN: true }),
          lengthM: fc.double({ min: 50, max: 800, noNaN: true }),
          wind: fc.double({ min: 0, max: 12, noNaN: true }),
        }),
        (x) => {
          const c = solveCarbonate({
            salinity: x.salinity,
            tempC: x.tempC,
            taUmolKg: x.ta,
            pco2Uatm: x.pco2,
          });
          if (!c.ok) return false;
          const f = forwardDownstream({
            up: {
              tempC: x.tempC,
              salinity: x.salinity,
              o2UmolKg: 200,
              taUmolKg: x.ta,
              dicUmolKg: c.dicUmolKg,
            },
            ncpMmolM2H: x.ncp,
            necMmolM2H: x.nec,
            pq: x.pq,
            uMS: x.u,
            depthM: x.h,
            lengthM: x.lengthM,
            airSea: { kind: 'wind', windMS: x.wind, xco2AirPpm: 420 },
          });
          if (!f.ok) return true; // fluxes too large for the residence time: nothing to invert
          const st = (o2: number, pco2: number): StationWindowMean => ({
            tempC: x.tempC,
            salinity: x.salinity,
            o2UmolKg: o2,
            pco2Uatm: pco2,
            taUmolKg: x.ta,
            taSource: 'salinity',
            depthM: x.h,
            flag: 1,
          });
          const r = computeTransectFlux(
            {
              tCentreMs: 0,
              up: st(200, f.upPco2Uatm),
              down: st(f.o2UmolKg, f.pco2Uatm),
              eastMS: 0,
              northMS: x.u,
              windMS: x.wind,
              baroHpa: 1013.25,
              xco2AirPpm: 420,
            },
            undefined,
            makeTransectParams({ lengthM: x.lengthM, bearingDeg: 0, pq: x.pq }),
            { uncertainty: false },
          );
          expect(Math.abs((r.ncpMmolM2H as number) - x.ncp)).toBeLessThan(1e-8 * Math.abs(x.ncp) + 1e-6);
          expect(r.necMmolM2H).not.toBeNull();
          expect(Math.abs((r.necMmolM2H as number) - x.nec)).toBeLessThan(1e-3);
          return true;
        },
      ),
      { numRuns: 150, seed: 20261202 },
    );
  });
});
