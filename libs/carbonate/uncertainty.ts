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

type SourceKind = 'input' | 'temp' | 'outTemp' | 'salinity' | 'pk' | 'bt';

/**
 * The constants at the central conditions, computed once per call, and scratch for the perturbed ones.
 * Only a temperature or salinity perturbation moves the conditions. An input perturbation solves with the
 * central constants; a pK or BT perturbation scales one of them in place for its solve and puts the exact
 * value back after it. Each solve so sees exactly the constants a fresh evaluation at its conditions gives
 * (equilibriumConstantsInto writes every field from its arguments alone): the differences, and the sigmas,
 * are the numbers constants recomputed per perturbation gave, at a fraction of the cost.
 */
interface Work {
  readonly baseIn: EquilibriumConstants;
  /** The same object as baseIn when the output conditions equal the input ones. */
  readonly baseOut: EquilibriumConstants;
  readonly cIn: EquilibriumConstants;
  readonly cOut: EquilibriumConstants;
  /** A copy of the input whose perturbed field is set for one solve and restored after it. */
  readonly inp: CarbonateInput;
}

function makeWork(input: CarbonateInput, opts: ResolvedCarbonateOptions): Work {
  const s = input.salinity;
  const tIn = input.tempC;
  const pIn = input.seaPressureDbar ?? 0;
  const tOut = input.outTempC ?? input.tempC;
  const pOut = input.outSeaPressureDbar ?? pIn;
  const baseIn = equilibriumConstantsInto(createConstants(), s, tIn, pIn, opts);
  const baseOut =
    tOut !== tIn || pOut !== pIn ? equilibriumConstantsInto(createConstants(), s, tOut, pOut, opts) : baseIn;
  return { baseIn, baseOut, cIn: createConstants(), cOut: createConstants(), inp: { ...input } };
}

/** Solves with the central constants scaled: field f of both sets multiplied by `factor`, then restored. */
function solveScaled(
  w: Work,
  f: keyof EquilibriumConstants,
  factor: number,
  input: CarbonateInput,
  state: Float64Array,
): boolean {
  const { baseIn, baseOut } = w;
  const wasIn = baseIn[f] as number;
  const wasOut = baseOut[f] as number;
  (baseIn[f] as number) = wasIn * factor;
  if (baseOut !== baseIn) (baseOut[f] as number) = wasOut * factor;
  const ok = solveWithConstants(baseIn, baseOut, input, state) === undefined;
  (baseIn[f] as number) = wasIn;
  (baseOut[f] as number) = wasOut;
  return ok;
}

/** One solve: the central one (kind undefined), or with one source moved by delta. */
function evaluate(
  input: CarbonateInput,
  opts: ResolvedCarbonateOptions,
  kind: SourceKind | undefined,
  key: string,
  delta: number,
  w: Work,
  state: Float64Array,
): boolean {
  if (kind === undefined) return solveWithConstants(w.baseIn, w.baseOut, input, state) === undefined;
  if (kind === 'input') {
    const k = key as InputKey;
    const was = input[k];
    w.inp[k] = (was ?? 0) + delta;
    const ok = solveWithConstants(w.baseIn, w.baseOut, w.inp, state) === undefined;
    if (was !== undefined) w.inp[k] = was;
    return ok;
  }
  if (kind === 'bt') return solveScaled(w, 'bt', 1 + delta, input, state);
  if (kind === 'pk')
    return solveScaled(w, PK_FIELDS[key as keyof typeof PK_FIELDS], Math.pow(10, -delta), input, state);
  const s = input.salinity + (kind === 'salinity' ? delta : 0);
  const tIn = input.tempC + (kind === 'temp' ? delta : 0);
  const pIn = input.seaPressureDbar ?? 0;
  // A temperature error of the input sensor moves the output temperature too when none is given separately.
  const tOut0 = input.outTempC ?? input.tempC;
  const tOut = tOut0 + (kind === 'outTemp' || (kind === 'temp' && input.outTempC === undefined) ? delta : 0);
  const pOut = input.outSeaPressureDbar ?? pIn;
  const cIn = equilibriumConstantsInto(w.cIn, s, tIn, pIn, opts);
  let cOut = cIn;
  if (tOut !== tIn || pOut !== pIn) cOut = equilibriumConstantsInto(w.cOut, s, tOut, pOut, opts);
  return solveWithConstants(cIn, cOut, input, state) === undefined;
}

/** STATE index of each UNCERTAIN_OUTPUTS entry, in that order. */
const OUTPUT_INDEX: readonly number[] = UNCERTAIN_OUTPUTS.map((o) => STATE_OF[o]);
const N_OUT = UNCERTAIN_OUTPUTS.length;

/**
 * One standard uncertainty for each output of solveCarbonate(input, options), from the input sigmas and the
 * constants' published uncertainties (default DEFAULT_CONSTANT_SIGMAS; sigmas.constants = 'none' drops them).
 * Only sigmas of inputs actually given count. Check value: TA 2300 +- 5, pCO2 400 +- 2 at S 35, t 25 gives
 * sigma(pH) about 0.0070, dominated by pK1 (uncertainty.test.ts; compare Orr et al. 2018, Table 3).
 * `detail: 'sigma'` leaves contributions and jacobian empty (the sigmas are the same), for callers that
 * only report the sigmas and would otherwise allocate two records per source for nothing.
 */
export function carbonateUncertainty(
  input: CarbonateInput,
  sigmas: CarbonateSigmas,
  options?: CarbonateOptions,
  detail: 'all' | 'sigma' = 'all',
): CarbonateUncertaintyResult {
  const central = solveCarbonate(input, options);
  if (!central.ok) return central;
  const opts = resolveCarbonateOptions(options);
  const sources: { name: string; sigma: number; kind: SourceKind; key: string }[] = [];
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

  const variance = new Float64Array(N_OUT);
  const jrow = new Float64Array(N_OUT);
  const contrib = new Float64Array(N_OUT);
  const contributions: Record<string, Record<UncertainOutput, number>> = {};
  const jacobian: Record<string, Record<UncertainOutput, number>> = {};
  const plus = new Float64Array(STATE_LENGTH);
  const minus = new Float64Array(STATE_LENGTH);
  const mid = new Float64Array(STATE_LENGTH);
  const work = makeWork(input, opts);
  evaluate(input, opts, undefined, '', 0, work, mid);
  for (const src of sources) {
    const d = 0.01 * src.sigma;
    const okPlus = evaluate(input, opts, src.kind, src.key, d, work, plus);
    const okMinus = evaluate(input, opts, src.kind, src.key, -d, work, minus);
    let lo = minus;
    let hi = plus;
    let width = 2 * d;
    if (okPlus && !okMinus) [lo, width] = [mid, d];
    else if (okMinus && !okPlus) [hi, width] = [mid, d];
    else if (!okPlus && !okMinus) {
      return {
        ok: false,
        flag: 4,
        code: 'REEFD_CARBONATE_NO_ROOT',
        reason: `perturbing ${src.name} by +-${d} leaves the system without a solution; the input is at the edge of its domain`,
      };
    }
    for (let j = 0; j < N_OUT; j++) {
      const i = OUTPUT_INDEX[j]!;
      const jac = (hi[i]! - lo[i]!) / width;
      const v = jac * src.sigma;
      jrow[j] = jac;
      contrib[j] = v * v;
      variance[j] = variance[j]! + v * v;
    }
    if (detail === 'all') {
      contributions[src.name] = recordOf(contrib);
      jacobian[src.name] = recordOf(jrow);
    }
  }
  for (let j = 0; j < N_OUT; j++) variance[j] = Math.sqrt(variance[j]!);
  const sigma = recordOf(variance);
  return { ok: true, flag: central.flag, value: central, sigma, contributions, jacobian };
}

/** The outputs in UNCERTAIN_OUTPUTS order as a record, written as a literal so every record has one shape. */
function recordOf(v: Float64Array): Record<UncertainOutput, number> {
  return {
    taUmolKg: v[0]!,
    dicUmolKg: v[1]!,
    phTotal: v[2]!,
    pco2Uatm: v[3]!,
    fco2Uatm: v[4]!,
    co3UmolKg: v[5]!,
    hco3UmolKg: v[6]!,
    co2UmolKg: v[7]!,
    omegaAr: v[8]!,
    omegaCa: v[9]!,
    revelle: v[10]!,
  } satisfies Record<UncertainOutput, number>;
}

// recordOf lists the outputs by position; uncertainty.test.ts checks it against UNCERTAIN_OUTPUTS.
