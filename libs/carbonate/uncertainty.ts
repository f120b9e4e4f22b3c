// First-order uncertainty propagation for the carbonate system (docs/methods/uncertainty.md 9.1): sigma_y^2 = sum_i
// (dy/dx_i sigma_i)^2 over independent inputs and constants, with dy/dx_i from central differences of
// half-width d_i = 0.01 sigma_i (the solver's 1e-10 pH tolerance keeps these differences clean). Constant
// uncertainties after Orr et al. (2018), Mar. Chem. 207, 84-107, applied alike at the input and output
// conditions (one constant, one error).

import { STATE, STATE_LENGTH } from './core.js';
import type { EquilibriumConstants } from './equilibrium.js';
import { createConstants, equilibriumConstantsInto, resolveCarbonateOptions } from './equilibrium.js';
import { solveCarbonate, solveWithConstants } from './solve.js';
import type {
  CarbonateInput,
  CarbonateOptions,
  CarbonateSigmas,
  CarbonateUncertaintyResult,
  ConstantSigmas,
  ResolvedCarbonateOptions,
  UncertainOutput,
} from './types.js';
import { DEFAULT_CONSTANT_SIGMAS, UNCERTAIN_OUTPUTS } from './types.js';

const STATE_OF: Record<UncertainOutput, number> = {
  taUmolKg: STATE.ta,
  dicUmolKg: STATE.dic,
  phTotal: STATE.ph,
  pco2Uatm: STATE.pco2,
  fco2Uatm: STATE.fco2,
  co3UmolKg: STATE.co3,
  hco3UmolKg: STATE.hco3,
  co2UmolKg: STATE.co2,
  omegaAr: STATE.omegaAr,
  omegaCa: STATE.omegaCa,
  revelle: STATE.revelle,
};

type InputKey = 'taUmolKg' | 'dicUmolKg' | 'phTotal' | 'pco2Uatm' | 'fco2Uatm' | 'po4UmolKg' | 'sio4UmolKg';
const INPUT_KEYS: readonly InputKey[] = [
  'taUmolKg',
  'dicUmolKg',
  'phTotal',
  'pco2Uatm',
  'fco2Uatm',
  'po4UmolKg',
  'sio4UmolKg',
];

/** Which constant a pK sigma perturbs: K' = K 10^(-dpK). */
const PK_FIELDS: Record<Exclude<keyof ConstantSigmas, 'btRel'>, keyof EquilibriumConstants> = {
  pK0: 'k0',
  pK1: 'k1',
  pK2: 'k2',
  pKB: 'kb',
  pKW: 'kw',
  pKspAr: 'kspAr',
  pKspCa: 'kspCa',
};

interface Perturbation {
  kind: 'input' | 'temp' | 'outTemp' | 'salinity' | 'pk' | 'bt';
  key: string;
  delta: number;
}

function evaluate(
  input: CarbonateInput,
  opts: ResolvedCarbonateOptions,
  p: Perturbation | undefined,
  state: Float64Array,
): boolean {
  let inp = input;
  if (p?.kind === 'input') inp = { ...input, [p.key]: (input[p.key as InputKey] ?? 0) + p.delta };
  const s = input.salinity + (p?.kind === 'salinity' ? p.delta : 0);
  const tIn = input.tempC + (p?.kind === 'temp' ? p.delta : 0);
  const pIn = input.seaPressureDbar ?? 0;
  // A temperature error of the input sensor moves the output temperature too when none is given separately.
  const tOut0 = input.outTempC ?? input.tempC;
  const tOut =
    tOut0 + (p?.kind === 'outTemp' || (p?.kind === 'temp' && input.outTempC === undefined) ? p.delta : 0);
  const pOut = input.outSeaPressureDbar ?? pIn;
  const cIn = createConstants();
  equilibriumConstantsInto(cIn, s, tIn, pIn, opts);
  let cOut = cIn;
  if (tOut !== tIn || pOut !== pIn) {
    cOut = createConstants();
    equilibriumConstantsInto(cOut, s, tOut, pOut, opts);
  }
  if (p?.kind === 'pk' || p?.kind === 'bt') {
    for (const c of cOut === cIn ? [cIn] : [cIn, cOut]) {
      if (p.kind === 'bt') c.bt *= 1 + p.delta;
      else {
        const f = PK_FIELDS[p.key as keyof typeof PK_FIELDS];
        c[f] *= Math.pow(10, -p.delta);
      }
    }
  }
  return solveWithConstants(cIn, cOut, inp, state) === undefined;
}

/**
 * One standard uncertainty for each output of solveCarbonate(input, options), from the input sigmas and the
 * constants' published uncertainties (default DEFAULT_CONSTANT_SIGMAS; sigmas.constants = 'none' drops them).
 * Only sigmas of inputs actually given count. Check value: TA 2300 +- 5, pCO2 400 +- 2 at S 35, t 25 gives
 * sigma(pH) about 0.0070, dominated by pK1 (uncertainty.test.ts; compare Orr et al. 2018, Table 3).
 */
export function carbonateUncertainty(
  input: CarbonateInput,
  sigmas: CarbonateSigmas,
  options?: CarbonateOptions,
): CarbonateUncertaintyResult {
  const central = solveCarbonate(input, options);
  if (!central.ok) return central;
  const opts = resolveCarbonateOptions(options);
  const sources: { name: string; sigma: number; kind: Perturbation['kind']; key: string }[] = [];
  for (const k of INPUT_KEYS) {
    const sg = sigmas[k];
    if (sg !== undefined && sg > 0 && input[k] !== undefined)
      sources.push({ name: k, sigma: sg, kind: 'input', key: k });
  }
  if (sigmas.tempC !== undefined && sigmas.tempC > 0) {
    sources.push({ name: 'tempC', sigma: sigmas.tempC, kind: 'temp', key: 'tempC' });
  }
  if (sigmas.outTempC !== undefined && sigmas.outTempC > 0 && input.outTempC !== undefined) {
    sources.push({ name: 'outTempC', sigma: sigmas.outTempC, kind: 'outTemp', key: 'outTempC' });
  }
  if (sigmas.salinity !== undefined && sigmas.salinity > 0) {
    sources.push({ name: 'salinity', sigma: sigmas.salinity, kind: 'salinity', key: 'salinity' });
  }
  if (sigmas.constants !== 'none') {
    const cs: ConstantSigmas = { ...DEFAULT_CONSTANT_SIGMAS, ...(sigmas.constants ?? {}) };
    for (const k of Object.keys(PK_FIELDS) as (keyof typeof PK_FIELDS)[]) {
      if (cs[k] > 0) sources.push({ name: k, sigma: cs[k], kind: 'pk', key: k });
    }
    if (cs.btRel > 0) sources.push({ name: 'btRel', sigma: cs.btRel, kind: 'bt', key: 'bt' });
  }

  const sigma = zeroRecord();
  const contributions: Record<string, Record<UncertainOutput, number>> = {};
  const jacobian: Record<string, Record<UncertainOutput, number>> = {};
  const plus = new Float64Array(STATE_LENGTH);
  const minus = new Float64Array(STATE_LENGTH);
  const mid = new Float64Array(STATE_LENGTH);
  evaluate(input, opts, undefined, mid);
  for (const src of sources) {
    const d = 0.01 * src.sigma;
    const okPlus = evaluate(input, opts, { kind: src.kind, key: src.key, delta: d }, plus);
    const okMinus = evaluate(input, opts, { kind: src.kind, key: src.key, delta: -d }, minus);
    let lo: Float64Array;
    let hi: Float64Array;
    let width: number;
    if (okPlus && okMinus) [lo, hi, width] = [minus, plus, 2 * d];
    else if (okPlus) [lo, hi, width] = [mid, plus, d];
    else if (okMinus) [lo, hi, width] = [minus, mid, d];
    else {
      return {
        ok: false,
        flag: 4,
        code: 'REEFD_CARBONATE_NO_ROOT',
        reason: `perturbing ${src.name} by +-${d} leaves the system without a solution; the input is at the edge of its domain`,
      };
    }
    const contrib = zeroRecord();
    const jrow = zeroRecord();
    for (const out of UNCERTAIN_OUTPUTS) {
      const i = STATE_OF[out];
      const jac = (hi[i]! - lo[i]!) / width;
      const v = jac * src.sigma;
      jrow[out] = jac;
      contrib[out] = v * v;
      sigma[out] += v * v;
    }
    contributions[src.name] = contrib;
    jacobian[src.name] = jrow;
  }
  for (const out of UNCERTAIN_OUTPUTS) sigma[out] = Math.sqrt(sigma[out]);
  return { ok: true, flag: central.flag, value: central, sigma, contributions, jacobian };
}

function zeroRecord(): Record<UncertainOutput, number> {
  const r = {} as Record<UncertainOutput, number>;
  for (const k of UNCERTAIN_OUTPUTS) r[k] = 0;
  return r;
}
