// Hot path of the carbonate solver (science spec 3.5-3.7): alkalinity of Dickson (1981) on the total scale,
// bracketed Newton on pH, closed forms for the other pairs, and the derived quantities. Everything here is in
// mol/kg and allocation-free: results go into a caller-owned Float64Array laid out by STATE.

import type { EquilibriumConstants } from './equilibrium.js';
import { fco2FromPco2, pco2FromFco2 } from './fugacity.js';

const LN10 = Math.LN10;
/** pH bracket of the root finder (science spec 3.7). */
export const PH_LO = 3;
export const PH_HI = 12;
const PH_TOL = 1e-10;
const BRACKET_TOL = 1e-12;
const MAX_ITER = 100;

/** Indices into a state vector (Float64Array of length STATE_LENGTH). Concentrations are umol/kg. */
export const STATE = {
  ta: 0,
  dic: 1,
  ph: 2,
  pco2: 3,
  fco2: 4,
  co3: 5,
  hco3: 6,
  co2: 7,
  omegaAr: 8,
  omegaCa: 9,
  revelle: 10,
} as const;
export const STATE_LENGTH = 11;

/** Non-carbonate alkalinity NC(H), mol/kg: borate, OH, phosphate, silicate minus free H, HSO4, HF. */
export function nonCarbonateAlkalinity(c: EquilibriumConstants, h: number, tp: number, tsi: number): number {
  const hf = h / c.totalPerFree;
  let nc = (c.bt * c.kb) / (c.kb + h) + c.kw / h - hf - c.st / (1 + c.ks / hf) - c.ft / (1 + c.kf / hf);
  if (tp !== 0) {
    const k12 = c.kp1 * c.kp2;
    const k123 = k12 * c.kp3;
    const h2 = h * h;
    nc += (tp * (k12 * h + 2 * k123 - h2 * h)) / (h2 * h + c.kp1 * h2 + k12 * h + k123);
  }
  if (tsi !== 0) nc += (tsi * c.ksi) / (c.ksi + h);
  return nc;
}

/** d NC / d H (dimensionless), for Newton. */
function dNonCarbonateDh(c: EquilibriumConstants, h: number, tp: number, tsi: number): number {
  const z = c.totalPerFree;
  const hf = h / z;
  const kbh = c.kb + h;
  const ksh = c.ks + hf;
  const kfh = c.kf + hf;
  let d =
    -(c.bt * c.kb) / (kbh * kbh) -
    c.kw / (h * h) -
    (1 + (c.st * c.ks) / (ksh * ksh) + (c.ft * c.kf) / (kfh * kfh)) / z;
  if (tp !== 0) {
    const k12 = c.kp1 * c.kp2;
    const k123 = k12 * c.kp3;
    const h2 = h * h;
    const num = k12 * h + 2 * k123 - h2 * h;
    const den = h2 * h + c.kp1 * h2 + k12 * h + k123;
    d += (tp * ((k12 - 3 * h2) * den - num * (3 * h2 + 2 * c.kp1 * h + k12))) / (den * den);
  }
  if (tsi !== 0) {
    const ksih = c.ksi + h;
    d -= (tsi * c.ksi) / (ksih * ksih);
  }
  return d;
}

/**
 * pH (total) from TA and DIC (mol/kg) by bracketed Newton on [3, 12]. NaN when no root lies in the
 * bracket or the iteration does not converge in 100 steps. TA_calc(pH) is strictly increasing.
 */
export function solvePhFromTaDic(
  c: EquilibriumConstants,
  ta: number,
  dic: number,
  tp: number,
  tsi: number,
  ph0: number,
): number {
  const k1 = c.k1;
  const k1k2 = k1 * c.k2;
  const k2x2 = 2 * c.k2;
  const k2x4 = 4 * c.k2;
  let lo = PH_LO;
  let hi = PH_HI;
  let x = ph0 > lo && ph0 < hi ? ph0 : 8;
  for (let i = 1; i <= MAX_ITER; i++) {
    const h = Math.exp(-LN10 * x);
    const d = h * h + k1 * h + k1k2;
    const f = (dic * k1 * (h + k2x2)) / d + nonCarbonateAlkalinity(c, h, tp, tsi) - ta;
    if (f > 0) hi = x;
    else lo = x;
    const dfdh = (-dic * k1 * (h * h + k2x4 * h + k1k2)) / (d * d) + dNonCarbonateDh(c, h, tp, tsi);
    let xn = x + f / (LN10 * h * dfdh); // dx = -f / (df/dpH), df/dpH = -ln10 H df/dH
    if (!(xn > lo && xn < hi)) xn = 0.5 * (lo + hi);
    const dx = xn - x;
    x = xn;
    if ((dx < PH_TOL && dx > -PH_TOL) || hi - lo < BRACKET_TOL) {
      return atEdge(x) ? NaN : x;
    }
  }
  return NaN;
}

/**
 * pH (total) from TA and CO2* (mol/kg): TA = K1 CO2 (H + 2 K2)/H^2 + NC(H), strictly increasing in pH.
 */
export function solvePhFromTaCo2(
  c: EquilibriumConstants,
  ta: number,
  co2: number,
  tp: number,
  tsi: number,
  ph0: number,
): number {
  const k1co2 = c.k1 * co2;
  const k2x2 = 2 * c.k2;
  const k2x4 = 4 * c.k2;
  let lo = PH_LO;
  let hi = PH_HI;
  let x = ph0 > lo && ph0 < hi ? ph0 : 8;
  for (let i = 1; i <= MAX_ITER; i++) {
    const h = Math.exp(-LN10 * x);
    const h2 = h * h;
    const f = (k1co2 * (h + k2x2)) / h2 + nonCarbonateAlkalinity(c, h, tp, tsi) - ta;
    if (f > 0) hi = x;
    else lo = x;
    const dfdh = (-k1co2 * (h + k2x4)) / (h2 * h) + dNonCarbonateDh(c, h, tp, tsi);
    let xn = x + f / (LN10 * h * dfdh);
    if (!(xn > lo && xn < hi)) xn = 0.5 * (lo + hi);
    const dx = xn - x;
    x = xn;
    if ((dx < PH_TOL && dx > -PH_TOL) || hi - lo < BRACKET_TOL) {
      return atEdge(x) ? NaN : x;
    }
  }
  return NaN;
}

/** A root pinned to a bracket end means the sign never changed inside it: no physical solution. */
function atEdge(x: number): boolean {
  return x - PH_LO < 1e-8 || PH_HI - x < 1e-8;
}

/** DIC (mol/kg) from TA and pH: (TA - NC) D / (K1 (H + 2 K2)). May be <= 0 for impossible inputs. */
export function dicFromTaPh(
  c: EquilibriumConstants,
  ta: number,
  ph: number,
  tp: number,
  tsi: number,
): number {
  const h = Math.exp(-LN10 * ph);
  const d = h * h + c.k1 * h + c.k1 * c.k2;
  return ((ta - nonCarbonateAlkalinity(c, h, tp, tsi)) * d) / (c.k1 * (h + 2 * c.k2));
}

/** TA (mol/kg) from DIC and pH. */
export function taFromDicPh(
  c: EquilibriumConstants,
  dic: number,
  ph: number,
  tp: number,
  tsi: number,
): number {
  const h = Math.exp(-LN10 * ph);
  const d = h * h + c.k1 * h + c.k1 * c.k2;
  return (dic * c.k1 * (h + 2 * c.k2)) / d + nonCarbonateAlkalinity(c, h, tp, tsi);
}

/** pH from DIC and CO2* (mol/kg); NaN unless DIC > CO2* > 0 (science spec 3.6). */
export function phFromDicCo2(c: EquilibriumConstants, dic: number, co2: number): number {
  const excess = dic - co2;
  if (!(excess > 0) || !(co2 > 0)) return NaN;
  const k1co2 = c.k1 * co2;
  const h = (k1co2 + Math.sqrt(k1co2 * k1co2 + 4 * excess * c.k1 * c.k2 * co2)) / (2 * excess);
  return -Math.log10(h);
}

/** DIC (mol/kg) from pH and CO2*: CO2 (1 + K1/H + K1 K2/H^2). */
export function dicFromPhCo2(c: EquilibriumConstants, ph: number, co2: number): number {
  const h = Math.exp(-LN10 * ph);
  return co2 * (1 + c.k1 / h + (c.k1 * c.k2) / (h * h));
}

/**
 * Fills every STATE entry from DIC (mol/kg), pH and TA (mol/kg); concentrations out in umol/kg.
 * The Revelle factor is the analytic derivative d ln [CO2*] / d ln DIC at constant TA (implicit function
 * theorem), which the +-1 umol/kg central difference of science spec 3.9 approximates to 1e-7.
 */
export function fillState(
  c: EquilibriumConstants,
  ta: number,
  dic: number,
  ph: number,
  tp: number,
  tsi: number,
  baroHpa: number,
  out: Float64Array,
): void {
  const h = Math.exp(-LN10 * ph);
  const k1 = c.k1;
  const k1k2 = k1 * c.k2;
  const d = h * h + k1 * h + k1k2;
  const co2 = (dic * h * h) / d;
  const co3 = (dic * k1k2) / d;
  const fco2 = (co2 / c.k0) * 1e6;
  // Revelle: dH/dDIC = -(dTA/dDIC)_H / (dTA/dH)_DIC; d ln CO2 = d ln DIC + (2/H - (2H + K1)/D) dH.
  const dTaDdic = (k1 * (h + 2 * c.k2)) / d;
  const dTaDh = (-dic * k1 * (h * h + 4 * c.k2 * h + k1k2)) / (d * d) + dNonCarbonateDh(c, h, tp, tsi);
  const revelle = 1 + dic * (2 / h - (2 * h + k1) / d) * (-dTaDdic / dTaDh);
  out[STATE.ta] = ta * 1e6;
  out[STATE.dic] = dic * 1e6;
  out[STATE.ph] = ph;
  out[STATE.fco2] = fco2;
  out[STATE.pco2] = pco2FromFco2(c, fco2, baroHpa);
  out[STATE.co3] = co3 * 1e6;
  out[STATE.hco3] = ((dic * k1 * h) / d) * 1e6;
  out[STATE.co2] = co2 * 1e6;
  out[STATE.omegaAr] = (c.ca * co3) / c.kspAr;
  out[STATE.omegaCa] = (c.ca * co3) / c.kspCa;
  out[STATE.revelle] = revelle;
}

/** Status codes of the pair solvers. */
export const SOLVE_OK = 0;
export const SOLVE_NO_ROOT = 1;
export const SOLVE_BAD_VALUE = 2;

/**
 * TA + pCO2 (umol/kg, uatm) -> full state in `out`. The hot path of the station pipeline and the
 * metabolism inverse. Returns SOLVE_OK or SOLVE_NO_ROOT.
 */
export function solveTaPco2Into(
  c: EquilibriumConstants,
  taUmolKg: number,
  pco2Uatm: number,
  out: Float64Array,
  ph0 = 8,
  baroHpa = 1013.25,
  po4UmolKg = 0,
  sio4UmolKg = 0,
): number {
  const fco2 = fco2FromPco2(c, pco2Uatm, baroHpa);
  return solveTaFco2Into(c, taUmolKg, fco2, out, ph0, baroHpa, po4UmolKg, sio4UmolKg);
}

/** TA + fCO2 (umol/kg, uatm) -> full state in `out`. */
export function solveTaFco2Into(
  c: EquilibriumConstants,
  taUmolKg: number,
  fco2Uatm: number,
  out: Float64Array,
  ph0 = 8,
  baroHpa = 1013.25,
  po4UmolKg = 0,
  sio4UmolKg = 0,
): number {
  const ta = taUmolKg * 1e-6;
  const tp = po4UmolKg * 1e-6;
  const tsi = sio4UmolKg * 1e-6;
  const co2 = c.k0 * fco2Uatm * 1e-6;
  if (!(co2 > 0)) return SOLVE_BAD_VALUE;
  const ph = solvePhFromTaCo2(c, ta, co2, tp, tsi, ph0);
  if (ph !== ph) return SOLVE_NO_ROOT;
  fillState(c, ta, dicFromPhCo2(c, ph, co2), ph, tp, tsi, baroHpa, out);
  return SOLVE_OK;
}

/** TA + DIC (umol/kg) -> full state in `out`. */
export function solveTaDicInto(
  c: EquilibriumConstants,
  taUmolKg: number,
  dicUmolKg: number,
  out: Float64Array,
  ph0 = 8,
  baroHpa = 1013.25,
  po4UmolKg = 0,
  sio4UmolKg = 0,
): number {
  const ta = taUmolKg * 1e-6;
  const dic = dicUmolKg * 1e-6;
  const tp = po4UmolKg * 1e-6;
  const tsi = sio4UmolKg * 1e-6;
  if (!(dic > 0)) return SOLVE_BAD_VALUE;
  const ph = solvePhFromTaDic(c, ta, dic, tp, tsi, ph0);
  if (ph !== ph) return SOLVE_NO_ROOT;
  fillState(c, ta, dic, ph, tp, tsi, baroHpa, out);
  return SOLVE_OK;
}
