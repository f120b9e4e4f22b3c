// Property tests (fast-check) of the solver: round trips through every input pair (docs/methods/carbonate.md 3.9),
// monotonicity, and that no input, however wild, lets a NaN out.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { CarbonateInput, CarbonateSolution } from './index.js';
import { solveCarbonate } from './index.js';

const conditions = fc.record({
  salinity: fc.double({ min: 20, max: 42, noNaN: true }),
  tempC: fc.double({ min: 0, max: 40, noNaN: true }),
  seaPressureDbar: fc.oneof(fc.constant(0), fc.double({ min: 0, max: 2000, noNaN: true })),
});
const taPco2 = fc.record({
  taUmolKg: fc.double({ min: 1500, max: 3000, noNaN: true }),
  pco2Uatm: fc.double({ min: 100, max: 3000, noNaN: true }),
});

function solved(input: CarbonateInput): CarbonateSolution {
  const r = solveCarbonate(input);
  if (!r.ok) throw new Error(`${r.code}: ${r.reason} for ${JSON.stringify(input)}`);
  return r;
}

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('carbonate solver properties', () => {
  it('TA + pCO2 -> DIC -> TA + DIC -> pCO2 returns pCO2 to 1e-9 relative (issue 3)', () => {
    fc.assert(
      fc.property(conditions, taPco2, (c, x) => {
        const a = solved({ ...c, ...x });
        const b = solved({ ...c, taUmolKg: x.taUmolKg, dicUmolKg: a.dicUmolKg });
        expect(rel(b.pco2Uatm, x.pco2Uatm)).toBeLessThan(1e-9);
        expect(Math.abs(b.phTotal - a.phTotal)).toBeLessThan(1e-9);
      }),
      { numRuns: 300 },
    );
  });

  it('every pair reproduces the others: 1e-6 umol/kg, 1e-9 pH, 1e-6 uatm (docs/methods/carbonate.md 3.9)', () => {
    fc.assert(
      fc.property(conditions, taPco2, (c, x) => {
        const a = solved({ ...c, ...x });
        const pairs: CarbonateInput[] = [
          { ...c, taUmolKg: a.taUmolKg, dicUmolKg: a.dicUmolKg },
          { ...c, taUmolKg: a.taUmolKg, phTotal: a.phTotal },
          { ...c, taUmolKg: a.taUmolKg, fco2Uatm: a.fco2Uatm },
          { ...c, dicUmolKg: a.dicUmolKg, phTotal: a.phTotal },
          { ...c, dicUmolKg: a.dicUmolKg, pco2Uatm: a.pco2Uatm },
          { ...c, phTotal: a.phTotal, pco2Uatm: a.pco2Uatm },
        ];
        for (const p of pairs) {
          const b = solved(p);
          expect(Math.abs(b.taUmolKg - a.taUmolKg)).toBeLessThan(1e-6);
          expect(Math.abs(b.dicUmolKg - a.dicUmolKg)).toBeLessThan(1e-6);
          expect(Math.abs(b.phTotal - a.phTotal)).toBeLessThan(1e-9);
          expect(Math.abs(b.pco2Uatm - a.pco2Uatm)).toBeLessThan(1e-6);
          expect(Math.abs(b.co3UmolKg - a.co3UmolKg)).toBeLessThan(1e-6);
        }
      }),
      { numRuns: 150 },
    );
  });

  it('output conditions: solving at t_in then reporting at t_out equals solving TA + DIC at t_out (docs/methods/carbonate.md 3.8)', () => {
    fc.assert(
      fc.property(conditions, taPco2, fc.double({ min: 0, max: 40, noNaN: true }), (c, x, tOut) => {
        const a = solved({ ...c, ...x, outTempC: tOut });
        const direct = solved({ ...c, tempC: tOut, taUmolKg: x.taUmolKg, dicUmolKg: a.dicUmolKg });
        expect(Math.abs(direct.phTotal - a.phTotal)).toBeLessThan(1e-9);
        expect(rel(direct.pco2Uatm, a.pco2Uatm)).toBeLessThan(1e-9);
      }),
      { numRuns: 100 },
    );
  });

  it('more DIC at fixed TA gives higher pCO2 and lower pH; more TA at fixed DIC gives lower pCO2 (common practice)', () => {
    fc.assert(
      fc.property(
        conditions,
        fc.double({ min: 1800, max: 2800, noNaN: true }),
        fc.double({ min: 0.75, max: 0.97, noNaN: true }),
        fc.double({ min: 0.1, max: 50, noNaN: true }),
        (c, ta, dicFrac, step) => {
          const dic = ta * dicFrac;
          const lo = solved({ ...c, taUmolKg: ta, dicUmolKg: dic });
          const hi = solved({ ...c, taUmolKg: ta, dicUmolKg: dic + step });
          expect(hi.pco2Uatm).toBeGreaterThan(lo.pco2Uatm);
          expect(hi.phTotal).toBeLessThan(lo.phTotal);
          expect(hi.omegaAr).toBeLessThan(lo.omegaAr);
          const moreTa = solved({ ...c, taUmolKg: ta + step, dicUmolKg: dic });
          expect(moreTa.pco2Uatm).toBeLessThan(lo.pco2Uatm);
        },
      ),
      { numRuns: 200 },
    );
  });

  it('Revelle factor equals the +-1 umol/kg central difference of ln fCO2 over ln DIC to 5e-5, its truncation error (docs/methods/carbonate.md 3.9)', () => {
    fc.assert(
      fc.property(conditions, taPco2, (c, x) => {
        const a = solved({ ...c, ...x });
        const up = solved({ ...c, taUmolKg: x.taUmolKg, dicUmolKg: a.dicUmolKg + 1 });
        const dn = solved({ ...c, taUmolKg: x.taUmolKg, dicUmolKg: a.dicUmolKg - 1 });
        const rf =
          (Math.log(up.fco2Uatm) - Math.log(dn.fco2Uatm)) /
          (Math.log(a.dicUmolKg + 1) - Math.log(a.dicUmolKg - 1));
        expect(rel(a.revelle, rf)).toBeLessThan(5e-5);
      }),
      { numRuns: 100 },
    );
  });

  it('the answer does not depend on the warm start (initialPh anywhere in 3-12, or none)', () => {
    fc.assert(
      fc.property(conditions, taPco2, fc.double({ min: 3.01, max: 11.99, noNaN: true }), (c, x, ph0) => {
        const a = solved({ ...c, ...x });
        const b = solved({ ...c, ...x, initialPh: ph0 });
        expect(Math.abs(a.phTotal - b.phTotal)).toBeLessThan(1e-12);
      }),
      { numRuns: 200 },
    );
  });

  it('no NaN escapes: any doubles give either finite outputs or a flag-4 error with a code', () => {
    const anyNumber = fc.oneof(
      fc.double(),
      fc.double({ min: -1e4, max: 1e4 }),
      fc.constantFrom(0, -0, Infinity, -Infinity, NaN, 1e-300, 1e300),
    );
    fc.assert(
      fc.property(
        fc.record({ salinity: anyNumber, tempC: anyNumber, a: anyNumber, b: anyNumber }),
        fc.constantFrom(
          ['taUmolKg', 'dicUmolKg'],
          ['taUmolKg', 'pco2Uatm'],
          ['taUmolKg', 'phTotal'],
          ['dicUmolKg', 'phTotal'],
          ['dicUmolKg', 'pco2Uatm'],
          ['phTotal', 'pco2Uatm'],
        ),
        (v, [k1, k2]) => {
          const r = solveCarbonate({ salinity: v.salinity, tempC: v.tempC, [k1!]: v.a, [k2!]: v.b });
          if (r.ok) {
            for (const val of Object.values(r))
              if (typeof val === 'number') expect(Number.isFinite(val)).toBe(true);
          } else {
            expect(r.flag).toBe(4);
            expect(r.code).toMatch(/^REEFD_CARBONATE_/);
            expect(r.reason.length).toBeGreaterThan(10);
          }
        },
      ),
      { numRuns: 2000 },
    );
  });
});
