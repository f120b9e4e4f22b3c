// Hot path of the carbonate solver (docs/methods/carbonate.md 3.5-3.7): alkalinity of Dickson (1981) on the total scale,
// bracketed Newton on pH, closed forms for the other pairs, and the derived quantities. Everything here is in
// mol/kg and allocation-free: results go into a caller-owned Float64Array laid out by STATE.

import type { EquilibriumConstants } from './equilibrium.js';
import { fco2FromPco2, pco2FromFco2 } from './fugacity.js';

const LN10 = Math.LN10;
/** pH bracket of the root finder (docs/methods/carbonate.md 3.7). */
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
  const nc = (c.bt * c.kb) / (c.kb + h) + c.kw / h - hf - c.st / (1 + c.ks / hf) - c.ft / (1 + c.kf / hf);
  return tp !== 0 || tsi !== 0 ? nc + nutrientAlkalinity(c, h, tp, tsi) : nc;
}

/** Phosphate (HPO4 + 2 PO4 - H3PO4) and silicate (SiO(OH)3) alkalinity, mol/kg. */
function nutrientAlkalinity(c: EquilibriumConstants, h: number, tp: number, tsi: number): number {
  const k12 = c.kp1 * c.kp2;
  const k123 = k12 * c.kp3;
  const h2 = h * h;
  return (
    (tp * (k12 * h + 2 * k123 - h2 * h)) / (h2 * h + c.kp1 * h2 + k12 * h + k123) +
    (tsi * c.ksi) / (c.ksi + h)
  );
}

/** d(nutrient alkalinity)/dH. */
function dNutrientDh(c: EquilibriumConstants, h: number, tp: number, tsi: number): number {
  const k12 = c.kp1 * c.kp2;
  const k123 = k12 * c.kp3;
  const h2 = h * h;
  const num = k12 * h + 2 * k123 - h2 * h;
  const den = h2 * h + c.kp1 * h2 + k12 * h + k123;
  const ksih = c.ksi + h;
  return (
    (tp * ((k12 - 3 * h2) * den - num * (3 * h2 + 2 * c.kp1 * h + k12))) / (den * den) -
    (tsi * c.ksi) / (ksih * ksih)
  );
}

/** d NC / d H (dimensionless), for Newton and the Revelle factor. */
function dNonCarbonateDh(c: EquilibriumConstants, h: number, tp: number, tsi: number): number {
  const z = c.totalPerFree;
  const hf = h / z;
  const kbh = c.kb + h;
  const ksh = c.ks + hf;
  const kfh = c.kf + hf;
  const d =
    -(c.bt * c.kb) / (kbh * kbh) -
    c.kw / (h * h) -
    (1 + (c.st * c.ks) / (ksh * ksh) + (c.ft * c.kf) / (kfh * kfh)) / z;
  return tp !== 0 || tsi !== 0 ? d + dNutrientDh(c, h, tp, tsi) : d;
}

/**
 * Bracketed Newton on x = pH (docs/methods/carbonate.md 3.7) for TA_calc(x) = TA, where the carbon term is either
 * DIC K1 (H + 2 K2)/D (co2Mode false, `carbon` = DIC) or K1 CO2 (H + 2 K2)/H^2 (co2Mode true, `carbon` =
 * CO2*). Both are strictly increasing in pH, so f > 0 moves the upper end and f <= 0 the lower end.
 * NaN when the root is not inside [3, 12] or 100 steps do not converge. f and f' share one pass.
 */
function solvePh(
  c: EquilibriumConstants,
  ta: number,
  carbon: number,
  co2Mode: boolean,
  tp: number,
  tsi: number,
  ph0: number,
): number {
  const k1 = c.k1;
  const k1k2 = k1 * c.k2;
  const k2x2 = 2 * c.k2;
  const k2x4 = 4 * c.k2;
  const btkb = c.bt * c.kb;
  const kb = c.kb;
  const kw = c.kw;
  const z = c.totalPerFree;
  const invZ = 1 / z;
  const st = c.st;
  const ks = c.ks;
  const ft = c.ft;
  const kf = c.kf;
  const nutrients = tp !== 0 || tsi !== 0;
  let lo = PH_LO;
  let hi = PH_HI;
  let x = ph0 > lo && ph0 < hi ? ph0 : 8;
  for (let i = 1; i <= MAX_ITER; i++) {
    const h = Math.exp(-LN10 * x);
    const hf = h * invZ;
    // Five reciprocals instead of a dozen divisions: the loop is division-bound.
    const rb = 1 / (kb + h);
    const rh = 1 / h;
    const rs = 1 / (ks + hf);
    const rf = 1 / (kf + hf);
    const bor = btkb * rb;
    const oh = kw * rh;
    let f = bor + oh - hf - st * hf * rs - ft * hf * rf - ta;
    let dfdh = -bor * rb - oh * rh - (1 + st * ks * rs * rs + ft * kf * rf * rf) * invZ;
    if (co2Mode) {
      const a = carbon * k1 * rh * rh; // K1 CO2 / H^2
      f += a * (h + k2x2);
      dfdh -= a * rh * (h + k2x4);
    } else {
      const rd = 1 / (h * h + k1 * h + k1k2);
      const a = carbon * k1 * rd;
      f += a * (h + k2x2);
      dfdh -= a * rd * (h * h + k2x4 * h + k1k2);
    }
    if (nutrients) {
      f += nutrientAlkalinity(c, h, tp, tsi);
      dfdh += dNutrientDh(c, h, tp, tsi);
    }
    if (f > 0) hi = x;
    else lo = x;
    let xn = x + f / (LN10 * h * dfdh); // dx = -f / (df/dpH), with df/dpH = -ln10 H df/dH
    // Non-strict bounds: at the root a sub-ulp Newton step lands exactly on the end just moved to x, and
    // must not be mistaken for a step out of the bracket. A bisection step never counts as convergence.
    let newton = true;
    if (!(xn >= lo && xn <= hi)) {
      xn = 0.5 * (lo + hi);
      newton = false;
    }
    const dx = xn - x;
    x = xn;
    if ((newton && dx < PH_TOL && dx > -PH_TOL) || hi - lo < BRACKET_TOL) return atEdge(x) ? NaN : x;
  }
  return NaN;
}

/**
 * Starting pH from the carbonate alkalinity alone, TA less borate at pH 8 (two-term approximation, then
 * one refinement of the borate, water and free-H terms): a quadratic in H for each pair. Within 0.01 pH
 * of the root over reef conditions, which saves Newton about two steps. Falls back to 8.
 */
function startPh(c: EquilibriumConstants, ta: number, carbon: number, co2Mode: boolean): number {
  const k1 = c.k1;
  const k1k2 = k1 * c.k2;
  let h = 1e-8;
  for (let pass = 0; pass < 2; pass++) {
    const tac = ta - (c.bt * c.kb) / (c.kb + h) - c.kw / h + h / c.totalPerFree;
    if (!(tac > 0)) return 8;
    let hn: number;
    if (co2Mode) {
      // TAc H^2 - K1 CO2 H - 2 K1 K2 CO2 = 0
      const b = k1 * carbon;
      hn = (b + Math.sqrt(b * b + 8 * tac * k1k2 * carbon)) / (2 * tac);
    } else {
      // TAc H^2 + (TAc - DIC) K1 H + (TAc - 2 DIC) K1 K2 = 0; a positive root needs TAc < 2 DIC
      if (!(tac < 2 * carbon)) return 8;
      const b = (tac - carbon) * k1;
      hn = (-b + Math.sqrt(b * b - 4 * tac * (tac - 2 * carbon) * k1k2)) / (2 * tac);
    }
    if (!(hn > 1e-12 && hn < 1e-3)) return 8;
    h = hn;
  }
  return -Math.log10(h);
}

/**
 * pH (total) from TA and DIC (mol/kg) by bracketed Newton on [3, 12]; ph0 = NaN picks the start by the
 * carbonate-alkalinity estimate. NaN when no root lies in the bracket.
 */
export function solvePhFromTaDic(
  c: EquilibriumConstants,
  ta: number,
  dic: number,
  tp: number,
  tsi: number,
  ph0 = NaN,
): number {
  return solvePh(c, ta, dic, false, tp, tsi, ph0 === ph0 ? ph0 : startPh(c, ta, dic, false));
}

/** pH (total) from TA and CO2* (mol/kg): TA = K1 CO2 (H + 2 K2)/H^2 + NC(H), strictly increasing in pH. */
export function solvePhFromTaCo2(
  c: EquilibriumConstants,
  ta: number,
  co2: number,
  tp: number,
  tsi: number,
  ph0 = NaN,
): number {
  return solvePh(c, ta, co2, true, tp, tsi, ph0 === ph0 ? ph0 : startPh(c, ta, co2, true));
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

/** pH from DIC and CO2* (mol/kg); NaN unless DIC > CO2* > 0 (docs/methods/carbonate.md 3.6). */
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
 * Fills every STATE entry from DIC (mol/kg), pH and TA (mol/kg); concentrations out in umol/kg. knownPco2Uatm
 * (when the input was that pCO2 at these conditions) skips the fCO2 -> pCO2 inversion. The Revelle factor is
 * the analytic derivative d ln [CO2*] / d ln DIC at constant TA (implicit function theorem), which the +-1
 * umol/kg central difference of docs/methods/carbonate.md 3.9 approximates to its truncation error (1e-5).
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
  knownPco2Uatm = NaN,
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
  out[STATE.pco2] = knownPco2Uatm === knownPco2Uatm ? knownPco2Uatm : pco2FromFco2(c, fco2, baroHpa);
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
  ph0 = NaN,
  baroHpa = 1013.25,
  po4UmolKg = 0,
  sio4UmolKg = 0,
): number {
  const fco2 = fco2FromPco2(c, pco2Uatm, baroHpa);
  return solveTaCo2(c, taUmolKg, fco2, pco2Uatm, out, ph0, baroHpa, po4UmolKg, sio4UmolKg);
}

/** TA + fCO2 (umol/kg, uatm) -> full state in `out`. */
export function solveTaFco2Into(
  c: EquilibriumConstants,
  taUmolKg: number,
  fco2Uatm: number,
  out: Float64Array,
  ph0 = NaN,
  baroHpa = 1013.25,
  po4UmolKg = 0,
  sio4UmolKg = 0,
): number {
  return solveTaCo2(c, taUmolKg, fco2Uatm, NaN, out, ph0, baroHpa, po4UmolKg, sio4UmolKg);
}

function solveTaCo2(
  c: EquilibriumConstants,
  taUmolKg: number,
  fco2Uatm: number,
  pco2Uatm: number,
  out: Float64Array,
  ph0: number,
  baroHpa: number,
  po4UmolKg: number,
  sio4UmolKg: number,
): number {
  const ta = taUmolKg * 1e-6;
  const tp = po4UmolKg * 1e-6;
  const tsi = sio4UmolKg * 1e-6;
  const co2 = c.k0 * fco2Uatm * 1e-6;
  if (!(co2 > 0) || !(ta === ta)) return SOLVE_BAD_VALUE;
  const ph = solvePhFromTaCo2(c, ta, co2, tp, tsi, ph0);
  if (ph !== ph) return SOLVE_NO_ROOT;
  fillState(c, ta, dicFromPhCo2(c, ph, co2), ph, tp, tsi, baroHpa, out, pco2Uatm);
  return SOLVE_OK;
}

/** TA + DIC (umol/kg) -> full state in `out`. */
export function solveTaDicInto(
  c: EquilibriumConstants,
  taUmolKg: number,
  dicUmolKg: number,
  out: Float64Array,
  ph0 = NaN,
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
