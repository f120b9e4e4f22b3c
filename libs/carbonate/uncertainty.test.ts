import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  carbonateUncertainty,
  solveCarbonate,
  UNCERTAIN_OUTPUTS,
  type CarbonateInput,
  type CarbonateOptions,
  type CarbonateSigmas,
} from './index.js';
import { referenceUncertainty } from '../../test/bench/lib/uncertainty-before.js';

const base = { salinity: 35, tempC: 25, taUmolKg: 2300, pco2Uatm: 400 };

describe('carbonateUncertainty (docs/methods/uncertainty.md 9.1)', () => {
  it('an input passes its own sigma through unchanged (TA +- 5 -> sigma TA 5)', () => {
    const r = carbonateUncertainty(base, { taUmolKg: 5, constants: 'none' });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.sigma.taUmolKg).toBeCloseTo(5, 8);
    expect(r.sigma.pco2Uatm).toBeLessThan(1e-9);
  });

  it('equals a hand-made central difference for pCO2 +- 2 uatm (first-order rule)', () => {
    const r = carbonateUncertainty(base, { pco2Uatm: 2, constants: 'none' });
    if (!r.ok) throw new Error(r.reason);
    const up = solveCarbonate({ ...base, pco2Uatm: 400.02 });
    const dn = solveCarbonate({ ...base, pco2Uatm: 399.98 });
    if (!up.ok || !dn.ok) throw new Error('solve failed');
    expect(r.sigma.phTotal).toBeCloseTo((Math.abs(up.phTotal - dn.phTotal) / 0.04) * 2, 10);
    // d pH / d ln pCO2 is about -0.85 here (common practice: pH falls ~0.002 per 1 % pCO2): 2 uatm ~ 0.0018.
    expect(r.sigma.phTotal).toBeGreaterThan(0.0015);
    expect(r.sigma.phTotal).toBeLessThan(0.0022);
  });

  it('sigma^2 is the sum of the contributions of the sources', () => {
    const r = carbonateUncertainty(base, { taUmolKg: 5, pco2Uatm: 2, tempC: 0.05, salinity: 0.05 });
    if (!r.ok) throw new Error(r.reason);
    for (const out of UNCERTAIN_OUTPUTS) {
      const sum = Object.values(r.contributions).reduce((acc, c) => acc + c[out], 0);
      expect(r.sigma[out] ** 2).toBeCloseTo(sum, 12);
    }
    expect(Object.keys(r.contributions)).toEqual(
      expect.arrayContaining(['taUmolKg', 'pco2Uatm', 'tempC', 'salinity', 'pK1', 'pK2', 'pKspAr', 'btRel']),
    );
  });

  it('TA + pCO2 at S 35, t 25 with Orr et al. (2018) constant sigmas: sigma(pH) 0.0070, sigma(Omega_ar) 0.18, pK1 dominant', () => {
    // Orr et al. (2018, Mar. Chem.) find sigma(pH) near 0.01 and sigma(Omega) near 0.2 for this kind of pair
    // with their (slightly larger) input uncertainties; from memory, order of magnitude only.
    const r = carbonateUncertainty(base, { taUmolKg: 5, pco2Uatm: 2, tempC: 0.05, salinity: 0.05 });
    if (!r.ok) throw new Error(r.reason);
    expect(r.sigma.phTotal).toBeCloseTo(0.00703, 4);
    expect(r.sigma.omegaAr).toBeGreaterThan(0.15);
    expect(r.sigma.omegaAr).toBeLessThan(0.22);
    const pk1 = r.contributions.pK1!.phTotal;
    for (const [name, c] of Object.entries(r.contributions))
      if (name !== 'pK1') expect(c.phTotal).toBeLessThan(pk1);
    // Only Omega depends on Ksp.
    expect(r.contributions.pKspAr!.omegaAr).toBeGreaterThan(0);
    expect(r.contributions.pKspAr!.phTotal).toBe(0);
  });

  it('returns the solver failure unchanged when there is no solution', () => {
    const r = carbonateUncertainty({ salinity: 35, tempC: 25, dicUmolKg: 5, pco2Uatm: 400 }, { pco2Uatm: 2 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('REEFD_CARBONATE_NO_ROOT');
  });

  it('jacobian: signed sensitivities; dpH/dpK1 is about +1 at TA + pCO2 (pH tracks pK1), dpH/dTA > 0', () => {
    const r = carbonateUncertainty(base, { taUmolKg: 5, pco2Uatm: 2 });
    if (!r.ok) throw new Error(r.reason);
    // K' = K 10^-dpK: a larger pK1 (weaker acid) at fixed CO2* and TA raises pH, by less than one unit.
    expect(r.jacobian.pK1!.phTotal).toBeGreaterThan(0.5);
    expect(r.jacobian.pK1!.phTotal).toBeLessThan(1);
    expect(r.jacobian.taUmolKg!.phTotal).toBeGreaterThan(0);
    expect(r.jacobian.pco2Uatm!.phTotal).toBeLessThan(0);
    expect(r.jacobian.taUmolKg!.phTotal ** 2 * 25).toBeCloseTo(r.contributions.taUmolKg!.phTotal, 15);
  });

  it('Omega from pKsp: sigma = ln(10) Omega sigma_pK to 4e-8, the central difference truncation (Omega is proportional to 10^pKsp)', () => {
    const r = carbonateUncertainty(base, { constants: { pK0: 0, pK1: 0, pK2: 0, pKB: 0, pKW: 0, btRel: 0 } });
    if (!r.ok) throw new Error(r.reason);
    expect(Math.abs(r.sigma.omegaAr / (Math.LN10 * r.value.omegaAr * 0.02) - 1)).toBeLessThan(1e-7);
    expect(Math.abs(r.sigma.omegaCa / (Math.LN10 * r.value.omegaCa * 0.02) - 1)).toBeLessThan(1e-7);
  });
});

// The propagation as first written (constants recomputed for every perturbed solve, records filled by key)
// is kept as the reference in test/bench/lib/uncertainty-before.ts (the carbonate benchmark times both): the
// faster one must give the very same numbers, not merely close ones.
/** Identical results (Object.is on every number, keys in the same order), and sigma-only equal sigmas. */
function same(input: CarbonateInput, sigmas: CarbonateSigmas, options?: CarbonateOptions): boolean {
  const got = carbonateUncertainty(input, sigmas, options);
  const want = referenceUncertainty(input, sigmas, options);
  expect(got).toStrictEqual(want);
  if (!got.ok || !want.ok) return false;
  expect(Object.keys(got.sigma)).toEqual([...UNCERTAIN_OUTPUTS]);
  for (const k of UNCERTAIN_OUTPUTS) expect(Object.is(got.sigma[k], want.sigma[k])).toBe(true);
  const lean = carbonateUncertainty(input, sigmas, options, 'sigma');
  expect(lean.ok && lean.sigma).toStrictEqual(want.sigma);
  expect(lean.ok && Object.keys(lean.contributions).length).toBe(0);
  return true;
}

const PROCESSOR_SIGMAS: CarbonateSigmas = { pco2Uatm: 4, taUmolKg: 10, tempC: 0.05, salinity: 0.05 };

describe('carbonateUncertainty gives the numbers of the per-source recomputation, exactly', () => {
  it('over a grid of conditions, input pairs and options', () => {
    let solved = 0;
    const pairs: Partial<CarbonateInput>[] = [
      { taUmolKg: 2300, pco2Uatm: 400 },
      { taUmolKg: 1900, pco2Uatm: 1200 },
      { taUmolKg: 2300, dicUmolKg: 2000 },
      { dicUmolKg: 1950, phTotal: 8.05 },
      { phTotal: 7.9, pco2Uatm: 600 },
      { taUmolKg: 2250, phTotal: 8.1 },
      { dicUmolKg: 2050, fco2Uatm: 380 },
    ];
    const options: (CarbonateOptions | undefined)[] = [
      undefined,
      {
        carbonicConstants: 'dickson-millero1987',
        boron: 'uppstrom1974',
        kw: 'millero1995-sws',
        fugacity: 'weiss1974-dilute',
      },
    ];
    for (const salinity of [20, 33, 36.5])
      for (const tempC of [2, 18, 29.5])
        for (const out of [{}, { outTempC: tempC + 1.3 }, { seaPressureDbar: 12, outSeaPressureDbar: 0 }])
          for (const pair of pairs)
            for (const opt of options) {
              const input = {
                salinity,
                tempC,
                ...out,
                ...pair,
                po4UmolKg: 0.4,
                sio4UmolKg: 3,
              } as CarbonateInput;
              const sig: CarbonateSigmas = {
                ...PROCESSOR_SIGMAS,
                dicUmolKg: 4,
                phTotal: 0.01,
                outTempC: 0.02,
              };
              if (same(input, sig, opt)) solved++;
            }
    expect(solved).toBeGreaterThan(300);
  });

  it('property: random conditions and inputs (as the processor calls it, warm-started)', () => {
    fc.assert(
      fc.property(
        fc.record({
          salinity: fc.double({ min: 5, max: 42, noNaN: true }),
          tempC: fc.double({ min: -1.5, max: 34, noNaN: true }),
          outTempC: fc.option(fc.double({ min: -1.5, max: 34, noNaN: true }), { nil: undefined }),
          taUmolKg: fc.double({ min: 1500, max: 2800, noNaN: true }),
          pco2Uatm: fc.double({ min: 100, max: 3000, noNaN: true }),
          baroHpa: fc.double({ min: 950, max: 1050, noNaN: true }),
          initialPh: fc.option(fc.double({ min: 7, max: 8.6, noNaN: true }), { nil: undefined }),
        }),
        fc.constantFrom<CarbonateSigmas>(PROCESSOR_SIGMAS, { taUmolKg: 3, pco2Uatm: 2, constants: 'none' }),
        (rec, sig) => {
          const input = Object.fromEntries(
            Object.entries(rec).filter(([, v]) => v !== undefined),
          ) as unknown as CarbonateInput;
          same(input, sig);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('returns the same failure at the edge of the domain', () => {
    same({ salinity: 35, tempC: 25, dicUmolKg: 5, pco2Uatm: 400 }, { pco2Uatm: 2 });
  });
});
