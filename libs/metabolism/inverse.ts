// Inverse NEC from pCO2 and O2 (docs/methods/metabolism.md 6.5, `nec_method: inverse`): along the transect DIC and TA change by
// the benthic fluxes -(NCP/PQ + NEC) and -2 NEC; NCP comes from the O2 budget; NEC is the root that makes the
// predicted downstream pCO2 equal the observed one. g(N) increases with N, because removing 2 TA per DIC raises
// pCO2 (Frankignoulle, Canon & Gattuso 1994, Limnol. Oceanogr. 39, 458-462). Root by Brent (1973).
// Uncertainty by the implicit-function theorem, dN/dx = -(dg/dx)/(dg/dN) (docs/methods/uncertainty.md 9.2).

import { brentExpanding } from './brent.js';
import { forwardSteady, forwardWithStorage, UMOL_M2_S_TO_MMOL_M2_H } from './budget.js';
import { constantsAt, solveTaDic, solveTaPco2, STATE, STATE_LENGTH, type Constants } from './chem.js';
import type { MetabolismErrorCode } from './errors.js';

/** Everything g(N) depends on; the uncertainty step perturbs these one at a time. */
export interface InverseInput {
  upTempC: number;
  upSalinity: number;
  upPco2Uatm: number;
  upTaUmolKg: number;
  downTempC: number;
  downSalinity: number;
  downPco2Uatm: number;
  /** O2 budget pieces, so that U, h and L perturb NCP coherently: NCP = rho h (St + U dO2/L) + F_as,O2. */
  o2StorageUmolKgS: number;
  o2DiffUmolKg: number;
  fasO2UmolM2S: number;
  /** An additive NCP offset [umol m-2 s-1]: 0, perturbed to carry the O2-only part of sigma(NCP). */
  ncpOffsetUmolM2S: number;
  pq: number;
  fasCo2UmolM2S: number;
  uMS: number;
  depthM: number;
  rhoKgM3: number;
  lengthM: number;
  /** Barometric pressure [hPa] for pCO2 <-> fCO2. */
  baroHpa: number;
  /**
   * Shifts of the carbonate constants shared by both stations (pK = -log10 K; BT relative), for the
   * uncertainty step only (docs/methods/uncertainty.md 9.1: station differences share constants). Default 0.
   */
  dpK0?: number;
  dpK1?: number;
  dpK2?: number;
  dpKB?: number;
  dpKW?: number;
  dBtRel?: number;
  /** Previous window (storage form of docs/methods/metabolism.md 6.4), else the steady form. */
  previous?: {
    dtS: number;
    upTaUmolKg: number;
    upDicUmolKg: number;
    upSalinity: number;
    downTaUmolKg: number;
    downDicUmolKg: number;
    downSalinity: number;
  };
}

export interface InverseOptions {
  bracketMmolM2H: number;
  maxDoublings: number;
  tolMmolM2H: number;
}

/** Constants and the upstream DIC of one input set, computed once and reused by every trial N. */
interface Prepared {
  x: InverseInput;
  cDown: Constants;
  upDic: number;
  state: Float64Array;
  /** Warm start of the downstream pH solve. */
  ph: number;
}

/** NCP [umol m-2 s-1] from the O2 budget pieces of an inverse input. */
export function ncpOfInput(x: InverseInput): number {
  return (
    x.rhoKgM3 * x.depthM * (x.o2StorageUmolKgS + (x.uMS * x.o2DiffUmolKg) / x.lengthM) +
    x.fasO2UmolM2S +
    x.ncpOffsetUmolM2S
  );
}

/** Applies the shared constant shifts of an input set to freshly evaluated constants (mutates c). */
function shiftConstants(c: Constants, x: InverseInput): Constants {
  if (x.dpK0) c.k0 *= Math.pow(10, -x.dpK0);
  if (x.dpK1) c.k1 *= Math.pow(10, -x.dpK1);
  if (x.dpK2) c.k2 *= Math.pow(10, -x.dpK2);
  if (x.dpKB) c.kb *= Math.pow(10, -x.dpKB);
  if (x.dpKW) c.kw *= Math.pow(10, -x.dpKW);
  if (x.dBtRel) c.bt *= 1 + x.dBtRel;
  return c;
}

function prepare(x: InverseInput): Prepared {
  const state = new Float64Array(STATE_LENGTH);
  const cUp = shiftConstants(constantsAt(x.upSalinity, x.upTempC), x);
  const ok = solveTaPco2(cUp, x.upTaUmolKg, x.upPco2Uatm, x.baroHpa, state);
  const upDic = ok ? (state[STATE.dic] as number) : Number.NaN;
  const ph = ok ? (state[STATE.ph] as number) : 8;
  const cDown =
    x.downSalinity === x.upSalinity && x.downTempC === x.upTempC
      ? cUp
      : shiftConstants(constantsAt(x.downSalinity, x.downTempC), x);
  return { x, cDown, upDic, state, ph };
}

/** Downstream TA and DIC [umol/kg] for a trial NEC nUmolM2S [umol m-2 s-1] (docs/methods/metabolism.md 6.5 step 2). */
function downstreamTaDic(x: InverseInput, upDic: number, nUmolM2S: number): [number, number] {
  const s0 = 0.5 * (x.upSalinity + x.downSalinity);
  const rh = x.rhoKgM3 * x.depthM;
  const ncpC = ncpOfInput(x) / x.pq;
  const qTa = (-2 * nUmolM2S) / rh;
  const qDic = -(ncpC + nUmolM2S + x.fasCo2UmolM2S) / rh;
  const nTaA = (x.upTaUmolKg * s0) / x.upSalinity;
  const nDicA = (upDic * s0) / x.upSalinity;
  const p = x.previous;
  let nTaB: number;
  let nDicB: number;
  if (p) {
    nTaB = forwardWithStorage(
      nTaA,
      (p.upTaUmolKg * s0) / p.upSalinity,
      (p.downTaUmolKg * s0) / p.downSalinity,
      qTa,
      x.uMS,
      x.lengthM,
      p.dtS,
    );
    nDicB = forwardWithStorage(
      nDicA,
      (p.upDicUmolKg * s0) / p.upSalinity,
      (p.downDicUmolKg * s0) / p.downSalinity,
      qDic,
      x.uMS,
      x.lengthM,
      p.dtS,
    );
  } else {
    nTaB = forwardSteady(nTaA, qTa, x.uMS, x.lengthM);
    nDicB = forwardSteady(nDicA, qDic, x.uMS, x.lengthM);
  }
  return [(nTaB * x.downSalinity) / s0, (nDicB * x.downSalinity) / s0];
}

/**
 * g(N) = pCO2_B,pred(N) - pCO2_B,obs [uatm]. Where the trial state is not solvable (e.g. TA <= 0 at large N),
 * returns +Infinity for N > 0 and -Infinity for N <= 0, the signs g tends to there; Brent then bisects.
 */
function residual(pr: Prepared, nUmolM2S: number): number {
  const x = pr.x;
  const [taB, dicB] = downstreamTaDic(x, pr.upDic, nUmolM2S);
  if (taB > 0 && dicB > 0 && solveTaDic(pr.cDown, taB, dicB, x.baroHpa, pr.state, pr.ph)) {
    pr.ph = pr.state[STATE.ph] as number;
    return (pr.state[STATE.pco2] as number) - x.downPco2Uatm;
  }
  return nUmolM2S > 0 ? Number.POSITIVE_INFINITY : Number.NEGATIVE_INFINITY;
}

/** g(N) of docs/methods/metabolism.md 6.5 step 3 for one input set [uatm]; NEC in umol m-2 s-1. */
export function inverseResidual(x: InverseInput, nUmolM2S: number): number {
  return residual(prepare(x), nUmolM2S);
}

export type InverseResult =
  | {
      ok: true;
      necUmolM2S: number;
      /** dg/dN at the root [uatm per umol m-2 s-1], > 0 for a well-posed inverse. */
      dgdN: number;
      downTaUmolKg: number;
      downDicUmolKg: number;
      upDicUmolKg: number;
      iterations: number;
      doublings: number;
    }
  | { ok: false; code: MetabolismErrorCode; reason: string };

/** Solves g(N) = 0 by Brent in [-B, B] mmol m-2 h-1, doubled up to maxDoublings times (docs/methods/metabolism.md 6.5 step 4). */
export function solveInverseNec(x: InverseInput, o: InverseOptions): InverseResult {
  const pr = prepare(x);
  if (!Number.isFinite(pr.upDic)) {
    return {
      ok: false,
      code: 'REEFD_METABOLISM_CARBONATE_FAILED',
      reason: `upstream DIC from TA ${x.upTaUmolKg} umol/kg and pCO2 ${x.upPco2Uatm} uatm could not be solved`,
    };
  }
  const g = (n: number) => residual(pr, n);
  const toUmol = 1 / UMOL_M2_S_TO_MMOL_M2_H;
  const r = brentExpanding(g, 0, o.bracketMmolM2H * toUmol, o.maxDoublings, { xTol: o.tolMmolM2H * toUmol });
  if (!r.ok) {
    return {
      ok: false,
      code: r.code === 'REEFD_METABOLISM_NO_BRACKET' ? 'REEFD_METABOLISM_NEC_NO_ROOT' : r.code,
      reason: `${r.reason} (bracket +-${(r.hi * UMOL_M2_S_TO_MMOL_M2_H).toFixed(0)} mmol m-2 h-1)`,
    };
  }
  // A sign change across a pole (the trial state stops being solvable, g -> +inf) is no root.
  if (!Number.isFinite(r.fx) || Math.abs(r.fx) > Math.max(1, 0.01 * x.downPco2Uatm)) {
    return {
      ok: false,
      code: 'REEFD_METABOLISM_NEC_NO_ROOT',
      reason: `g changes sign only where the downstream state has no carbonate solution (pCO2 residual ${r.fx} uatm)`,
    };
  }
  const [taB, dicB] = downstreamTaDic(x, pr.upDic, r.x);
  const dn = 0.01 * toUmol; // 0.01 mmol m-2 h-1; g is smooth and nearly linear over this step
  const dgdN = (g(r.x + dn) - g(r.x - dn)) / (2 * dn);
  return {
    ok: true,
    necUmolM2S: r.x,
    dgdN,
    downTaUmolKg: taB,
    downDicUmolKg: dicB,
    upDicUmolKg: pr.upDic,
    iterations: r.iterations,
    doublings: r.doublings,
  };
}

export type InverseSigmaKey =
  | 'upPco2Uatm'
  | 'downPco2Uatm'
  | 'upTaUmolKg'
  | 'upTempC'
  | 'downTempC'
  | 'upSalinity'
  | 'downSalinity'
  | 'ncpOffsetUmolM2S'
  | 'pq'
  | 'fasCo2UmolM2S'
  | 'uMS'
  | 'depthM'
  | 'lengthM'
  | 'dpK0'
  | 'dpK1'
  | 'dpK2'
  | 'dpKB'
  | 'dpKW'
  | 'dBtRel';

/**
 * First-order sigma of the inverse NEC [umol m-2 s-1] (docs/methods/uncertainty.md 9.1-9.2): dN/dx_i = -(dg/dx_i)/(dg/dN) with
 * central differences d_i = 0.01 sigma_i, summed in quadrature over the independent inputs. Returns the total
 * and each input's contribution.
 */
export function inverseNecSigma(
  x: InverseInput,
  necUmolM2S: number,
  dgdN: number,
  sigmas: Partial<Record<InverseSigmaKey, number>>,
): { sigmaUmolM2S: number; parts: Partial<Record<InverseSigmaKey, number>> } {
  let sum = 0;
  const parts: Partial<Record<InverseSigmaKey, number>> = {};
  for (const key of Object.keys(sigmas) as InverseSigmaKey[]) {
    const s = sigmas[key];
    if (s === undefined || !(s > 0)) continue;
    const d = 0.01 * s;
    const x0 = x[key] ?? 0;
    const xp: InverseInput = { ...x, [key]: x0 + d };
    const xm: InverseInput = { ...x, [key]: x0 - d };
    const dgdx = (inverseResidual(xp, necUmolM2S) - inverseResidual(xm, necUmolM2S)) / (2 * d);
    const part = Math.abs((dgdx / dgdN) * s);
    if (Number.isFinite(part)) {
      parts[key] = part;
      sum += part * part;
    }
  }
  return { sigmaUmolM2S: Math.sqrt(sum), parts };
}

/** The same input without its previous window: the steady form of docs/methods/metabolism.md 6.4. */
function steadyForm(x: InverseInput): InverseInput {
  const { previous: _previous, ...steady } = x;
  return steady;
}

/**
 * First-order sigma of the inverse NEC from errors of two kinds (docs/methods/uncertainty.md 9.2):
 * - `systematic`: errors the same in every window (calibrations, TA from salinity, PQ, the transfer velocity,
 *   geometry, the shared constants). In the storage form the previous window carries the same error, and the
 *   response to an error that persists is the steady form's (the storage term of a constant error is zero), so
 *   their partials come from the steady form. Perturbing the current window alone would read as a change over
 *   one window and be amplified by (1/(2 dt) + U/L)/(U/L), twice or more on a slow flat.
 * - `random`: errors of this window's means alone (their standard errors), with the partials of the form used.
 * The two sums add in quadrature. Returns the total and each part.
 */
export function inverseNecSigmaSplit(
  x: InverseInput,
  necUmolM2S: number,
  dgdN: number,
  systematic: Partial<Record<InverseSigmaKey, number>>,
  random: Partial<Record<InverseSigmaKey, number>>,
): {
  sigmaUmolM2S: number;
  systematic: Partial<Record<InverseSigmaKey, number>>;
  random: Partial<Record<InverseSigmaKey, number>>;
} {
  let steady = x;
  let dgdNSteady = dgdN;
  if (x.previous !== undefined) {
    steady = steadyForm(x);
    const dn = 0.01 / UMOL_M2_S_TO_MMOL_M2_H;
    dgdNSteady =
      (inverseResidual(steady, necUmolM2S + dn) - inverseResidual(steady, necUmolM2S - dn)) / (2 * dn);
  }
  const sys = inverseNecSigma(steady, necUmolM2S, dgdNSteady, systematic);
  const rnd = inverseNecSigma(x, necUmolM2S, dgdN, random);
  return {
    sigmaUmolM2S: Math.hypot(sys.sigmaUmolM2S, rnd.sigmaUmolM2S),
    systematic: sys.parts,
    random: rnd.parts,
  };
}
