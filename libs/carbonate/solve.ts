// solveCarbonate: one carbonate system from any two of TA, DIC, pH, pCO2/fCO2 (docs/methods/carbonate.md 3.6), at the
// input conditions, then re-solved from TA + DIC at the output conditions (docs/methods/carbonate.md 3.8).

import {
  dicFromPhCo2,
  dicFromTaPh,
  fillState,
  phFromDicCo2,
  solvePhFromTaCo2,
  solvePhFromTaDic,
  STATE,
  STATE_LENGTH,
  taFromDicPh,
} from './core.js';
import type { EquilibriumConstants } from './equilibrium.js';
import {
  createConstants,
  equilibriumConstantsInto,
  rangeNotes,
  resolveCarbonateOptions,
} from './equilibrium.js';
import { fco2FromPco2, STANDARD_BARO_HPA } from './fugacity.js';
import type {
  CarbonateErrorCode,
  CarbonateFailure,
  CarbonateInput,
  CarbonateOptions,
  CarbonateResult,
  CarbonateSolution,
  ResolvedCarbonateOptions,
} from './types.js';

const LN10 = Math.LN10;

function fail(code: CarbonateErrorCode, reason: string): CarbonateFailure {
  return { ok: false, flag: 4, code, reason };
}

const PAIR_KEYS = ['taUmolKg', 'dicUmolKg', 'phTotal', 'pco2Uatm', 'fco2Uatm'] as const;

/** Domain checks on the conditions; values outside a fit's own range are still solved (flag 3). */
function checkConditions(input: CarbonateInput): CarbonateFailure | undefined {
  const finite = (
    name: string,
    v: number | undefined,
    lo: number,
    hi: number,
  ): CarbonateFailure | undefined => {
    if (v === undefined) return undefined;
    if (!Number.isFinite(v) || v < lo || v > hi) {
      return fail(
        'REEFD_CARBONATE_BAD_INPUT',
        `${name} = ${v} is outside ${lo} to ${hi}; pass a finite value in range`,
      );
    }
    return undefined;
  };
  if (!Number.isFinite(input.salinity) || !Number.isFinite(input.tempC)) {
    return fail('REEFD_CARBONATE_BAD_INPUT', 'salinity and tempC are required finite numbers');
  }
  return (
    finite('salinity', input.salinity, 0, 50) ??
    finite('tempC', input.tempC, -3, 50) ??
    finite('seaPressureDbar', input.seaPressureDbar, 0, 12000) ??
    finite('outTempC', input.outTempC, -3, 50) ??
    finite('outSeaPressureDbar', input.outSeaPressureDbar, 0, 12000) ??
    finite('baroHpa', input.baroHpa, 500, 1200) ??
    finite('po4UmolKg', input.po4UmolKg, 0, 1000) ??
    finite('sio4UmolKg', input.sio4UmolKg, 0, 1000) ??
    finite('initialPh', input.initialPh, -100, 100)
  );
}

/**
 * Solves the carbonate system. Input concentrations in umol/kg, pCO2/fCO2 in uatm, pH on the total scale.
 * Returns every output at the output conditions, or { ok: false, flag: 4 } with a stable code:
 * REEFD_CARBONATE_BAD_PAIR (not exactly two inputs), REEFD_CARBONATE_BAD_INPUT (non-finite or out of domain),
 * REEFD_CARBONATE_NO_ROOT (no physical solution, e.g. DIC <= CO2* or TA below the non-carbonate alkalinity).
 * Check value: TA 2300, pCO2 400 uatm, S 35, t 25 degC gives pH 8.0426, DIC 1998.6 umol/kg, Omega_ar 3.36
 * with the default constants (PyCO2SYS 1.8.3.4, test/reference/carbonate.test.ts).
 */
export function solveCarbonate(input: CarbonateInput, options?: CarbonateOptions): CarbonateResult {
  let resolved: ResolvedCarbonateOptions;
  try {
    resolved = resolveCarbonateOptions(options);
  } catch (e) {
    return fail('REEFD_CARBONATE_BAD_INPUT', (e as Error).message);
  }
  const given: string[] = [];
  for (const k of PAIR_KEYS) {
    const v = input[k];
    if (v !== undefined) {
      given.push(k);
      if (!Number.isFinite(v)) return fail('REEFD_CARBONATE_BAD_INPUT', `${k} = ${v} is not a finite number`);
    }
  }
  if (given.length !== 2 || (input.pco2Uatm !== undefined && input.fco2Uatm !== undefined)) {
    return fail(
      'REEFD_CARBONATE_BAD_PAIR',
      `give exactly two of taUmolKg, dicUmolKg, phTotal, pco2Uatm|fco2Uatm (pCO2 and fCO2 are one kind); got ${given.length === 0 ? 'none' : given.join(', ')}`,
    );
  }
  const bad = checkConditions(input);
  if (bad) return bad;
  const nutrients = (input.po4UmolKg ?? 0) !== 0 || (input.sio4UmolKg ?? 0) !== 0;
  const cIn = createConstants();
  equilibriumConstantsInto(cIn, input.salinity, input.tempC, input.seaPressureDbar ?? 0, resolved, nutrients);
  const outTempC = input.outTempC ?? input.tempC;
  const outP = input.outSeaPressureDbar ?? input.seaPressureDbar ?? 0;
  let cOut = cIn;
  if (outTempC !== input.tempC || outP !== (input.seaPressureDbar ?? 0)) {
    cOut = createConstants();
    equilibriumConstantsInto(cOut, input.salinity, outTempC, outP, resolved, nutrients);
  }
  const state = new Float64Array(STATE_LENGTH);
  const r = solveWithConstants(cIn, cOut, input, state);
  if (r !== undefined) return r;
  const notes = rangeNotes(cIn.rangeMask, resolved, input.tempC, input.salinity);
  if (cOut !== cIn)
    notes.push(...rangeNotes(cOut.rangeMask & ~cIn.rangeMask, resolved, outTempC, input.salinity));
  const flag = (cIn.rangeMask | cOut.rangeMask) !== 0 ? 3 : 1;
  if (input.phTotal !== undefined && (input.pco2Uatm !== undefined || input.fco2Uatm !== undefined)) {
    notes.push('pH + pCO2 is ill-conditioned for TA and DIC; propagate the input uncertainties');
  }
  return toSolution(state, cOut, flag, notes);
}

/** Builds the public result from a state vector at the output constants. */
function toSolution(
  state: Float64Array,
  c: EquilibriumConstants,
  flag: 1 | 3,
  notes: string[],
): CarbonateSolution {
  const ph = state[STATE.ph]!;
  return {
    ok: true,
    flag,
    taUmolKg: state[STATE.ta]!,
    dicUmolKg: state[STATE.dic]!,
    phTotal: ph,
    phFree: ph + Math.log10(c.totalPerFree),
    phSws: ph - Math.log10(c.swsPerTotal),
    pco2Uatm: state[STATE.pco2]!,
    fco2Uatm: state[STATE.fco2]!,
    co3UmolKg: state[STATE.co3]!,
    hco3UmolKg: state[STATE.hco3]!,
    co2UmolKg: state[STATE.co2]!,
    omegaAr: state[STATE.omegaAr]!,
    omegaCa: state[STATE.omegaCa]!,
    revelle: state[STATE.revelle]!,
    notes,
  };
}

/** The input pair in mol/kg at cIn, with the total phosphate and silicate; a failure for values out of range. */
function pairInputs(cIn: EquilibriumConstants, input: CarbonateInput) {
  const tp = (input.po4UmolKg ?? 0) * 1e-6;
  const tsi = (input.sio4UmolKg ?? 0) * 1e-6;
  const baro = input.baroHpa ?? STANDARD_BARO_HPA;
  const ph0 = input.initialPh ?? NaN; // NaN: start from the carbonate-alkalinity estimate
  const ta = input.taUmolKg === undefined ? undefined : input.taUmolKg * 1e-6;
  const dic = input.dicUmolKg === undefined ? undefined : input.dicUmolKg * 1e-6;
  const ph = input.phTotal;
  let fco2 = input.fco2Uatm;
  if (fco2 === undefined && input.pco2Uatm !== undefined) fco2 = fco2FromPco2(cIn, input.pco2Uatm, baro);
  const co2 = fco2 === undefined ? undefined : cIn.k0 * fco2 * 1e-6;

  if (dic !== undefined && !(dic > 0)) return fail('REEFD_CARBONATE_BAD_INPUT', 'dicUmolKg must be > 0');
  if (co2 !== undefined && !(co2 > 0)) return fail('REEFD_CARBONATE_BAD_INPUT', 'pCO2/fCO2 must be > 0 uatm');
  if (ph !== undefined && !(ph > 3 && ph < 12)) {
    return fail('REEFD_CARBONATE_BAD_INPUT', `phTotal = ${ph} is outside the solver's bracket 3 to 12`);
  }
  return { tp, tsi, baro, ph0, ta, dic, ph, fco2, co2 };
}

type PairInputs = Exclude<ReturnType<typeof pairInputs>, CarbonateFailure>;

/** TA, DIC and pH (mol/kg, total scale) at cIn from a pair with TA. */
function solveTaPair(
  cIn: EquilibriumConstants,
  input: CarbonateInput,
  ta: number,
  q: PairInputs,
): CarbonateFailure | { taS: number; dicS: number; phS: number } {
  const { tp, tsi, ph0, dic, ph, co2 } = q;
  if (dic !== undefined) {
    const phS = solvePhFromTaDic(cIn, ta, dic, tp, tsi, ph0);
    if (phS !== phS) {
      return fail(
        'REEFD_CARBONATE_NO_ROOT',
        `no pH in 3 to 12 balances TA ${input.taUmolKg} with DIC ${input.dicUmolKg} umol/kg; check units (umol/kg) and that TA and DIC are of the same water`,
      );
    }
    return { taS: ta, dicS: dic, phS };
  } else if (co2 !== undefined) {
    const phS = solvePhFromTaCo2(cIn, ta, co2, tp, tsi, ph0);
    if (phS !== phS) {
      return fail(
        'REEFD_CARBONATE_NO_ROOT',
        `no pH in 3 to 12 balances TA ${input.taUmolKg} umol/kg with fCO2 ${q.fco2} uatm; check units and the pCO2 reading`,
      );
    }
    return { taS: ta, dicS: dicFromPhCo2(cIn, phS, co2), phS };
  } else if (ph !== undefined) {
    const dicS = dicFromTaPh(cIn, ta, ph, tp, tsi);
    if (!(dicS > 0)) {
      return fail(
        'REEFD_CARBONATE_NO_ROOT',
        `TA ${input.taUmolKg} umol/kg is at or below the non-carbonate alkalinity at pH ${ph}: DIC would be <= 0`,
      );
    }
    return { taS: ta, dicS, phS: ph };
  }
  return fail('REEFD_CARBONATE_BAD_PAIR', 'give exactly two of TA, DIC, pH, pCO2/fCO2');
}

/** TA, DIC and pH (mol/kg, total scale) at cIn from a pair without TA. */
function solveOtherPair(
  cIn: EquilibriumConstants,
  input: CarbonateInput,
  q: PairInputs,
): CarbonateFailure | { taS: number; dicS: number; phS: number } {
  const { tp, tsi, dic, ph, co2 } = q;
  if (dic !== undefined && ph !== undefined) {
    return { taS: taFromDicPh(cIn, dic, ph, tp, tsi), dicS: dic, phS: ph };
  } else if (dic !== undefined && co2 !== undefined) {
    const phS = phFromDicCo2(cIn, dic, co2);
    if (!(phS > 3 && phS < 12)) {
      return fail(
        'REEFD_CARBONATE_NO_ROOT',
        `DIC ${input.dicUmolKg} umol/kg must exceed CO2* ${(co2 * 1e6).toPrecision(6)} umol/kg (K0 fCO2) with pH in 3 to 12`,
      );
    }
    return { dicS: dic, taS: taFromDicPh(cIn, dic, phS, tp, tsi), phS };
  } else if (ph !== undefined && co2 !== undefined) {
    const dicS = dicFromPhCo2(cIn, ph, co2);
    return { phS: ph, dicS, taS: taFromDicPh(cIn, dicS, ph, tp, tsi) };
  }
  return fail('REEFD_CARBONATE_BAD_PAIR', 'give exactly two of TA, DIC, pH, pCO2/fCO2');
}

/**
 * Solves the input pair at cIn, then (when cOut differs) TA + DIC at cOut, into `state`. Returns undefined
 * on success or a failure. Exported for batch users that evaluate constants once per (S, t, P).
 */
export function solveWithConstants(
  cIn: EquilibriumConstants,
  cOut: EquilibriumConstants,
  input: CarbonateInput,
  state: Float64Array,
): CarbonateFailure | undefined {
  const q = pairInputs(cIn, input);
  if ('ok' in q) return q;
  const { tp, tsi, baro } = q;
  const sys = q.ta !== undefined ? solveTaPair(cIn, input, q.ta, q) : solveOtherPair(cIn, input, q);
  if ('ok' in sys) return sys;
  const { taS, dicS } = sys;
  let phS = sys.phS;

  if (cOut !== cIn) {
    const phOut = solvePhFromTaDic(cOut, taS, dicS, tp, tsi, phS);
    if (phOut !== phOut) {
      return fail(
        'REEFD_CARBONATE_NO_ROOT',
        `the system solved at the input conditions has no pH in 3 to 12 at the output conditions (t ${cOut.tempC} degC, ${cOut.seaPressureDbar} dbar)`,
      );
    }
    phS = phOut;
  }
  // A pCO2 input at unchanged conditions is its own output: skip the fCO2 -> pCO2 inversion.
  const knownPco2 = cOut === cIn && input.pco2Uatm !== undefined ? input.pco2Uatm : NaN;
  fillState(cOut, taS, dicS, phS, tp, tsi, baro, state, knownPco2);
  for (let i = 0; i < STATE_LENGTH; i++) {
    if (!Number.isFinite(state[i]!)) {
      return fail(
        'REEFD_CARBONATE_NO_ROOT',
        'the inputs give a non-finite result; they have no physical solution',
      );
    }
  }
  return undefined;
}

/** pH scale conversions at one set of constants (docs/methods/carbonate.md 3.3). */
export function phTotalToFree(c: EquilibriumConstants, phTotal: number): number {
  return phTotal + Math.log10(c.totalPerFree);
}
export function phFreeToTotal(c: EquilibriumConstants, phFree: number): number {
  return phFree - Math.log10(c.totalPerFree);
}
export function phTotalToSws(c: EquilibriumConstants, phTotal: number): number {
  return phTotal - Math.log10(c.swsPerTotal);
}
export function phSwsToTotal(c: EquilibriumConstants, phSws: number): number {
  return phSws + Math.log10(c.swsPerTotal);
}

/** [H+] total scale (mol/kg) from pH. */
export function hFromPh(ph: number): number {
  return Math.exp(-LN10 * ph);
}
