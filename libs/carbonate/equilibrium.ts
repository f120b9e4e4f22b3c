// Assembly of the stoichiometric constants at (S, t, P), on the total scale (docs/methods/carbonate.md 3.1-3.3):
// evaluate each fit at 1 atm, move K1, K2, KB, KW (and KP, KSi) to the seawater scale with KS, KF at 1 atm,
// correct for pressure (Millero 1995), return to the total scale with the pressure-corrected KS, KF.
// This order is the one of docs/methods/carbonate.md 3.2 and of CO2SYS/PyCO2SYS, so the two agree at depth too.

import { k1DicksonMillero1987Sws, k2DicksonMillero1987Sws } from './constants/dickson-millero1987.js';
import { kbDickson1990, ksDickson1990 } from './constants/dickson1990.js';
import { k1Lueker2000, k2Lueker2000 } from './constants/lueker2000.js';
import { kwMillero1995Sws, kwMillero1995Total } from './constants/millero1995.js';
import { kspAragoniteMucci1983, kspCalciteMucci1983 } from './constants/mucci1983.js';
import { kfPerezFraga1987 } from './constants/perez-fraga1987.js';
import { PRESSURE_COEFFS, pressureFactor } from './constants/pressure.js';
import {
  totalBoronLee2010,
  totalBoronUppstrom1974,
  totalCalcium,
  totalFluoride,
  totalSulfate,
} from './constants/totals.js';
import { k0Weiss1974, virialBWeiss1974, virialDeltaWeiss1974 } from './constants/weiss1974.js';
import type { FitTerms } from './constants/terms.js';
import { kpYaoMillero1995Sws, ksiYaoMillero1995Sws } from './constants/yao-millero1995.js';
import type { CarbonateOptions, ResolvedCarbonateOptions } from './types.js';
import { CARBONATE_OPTION_NAMES, DEFAULT_CARBONATE_OPTIONS } from './types.js';
import { CARBONATE_ERRORS } from './errors.js';

/** Bits of EquilibriumConstants.rangeMask: which fits were evaluated outside their published t/S range. */
export const RANGE_BITS = {
  k0: 1,
  k1k2: 2,
  kb: 4,
  kw: 8,
  ks: 16,
  kf: 32,
  ksp: 64,
} as const;

/** Published validity of each fit: [tMin, tMax] degC, [sMin, sMax]. */
const FIT_RANGES: Record<string, readonly [number, number, number, number, string]> = {
  k0: [-1, 40, 0, 40, 'K0 Weiss (1974)'],
  lueker2000: [2, 35, 19, 43, 'K1, K2 Lueker et al. (2000)'],
  'dickson-millero1987': [2, 35, 20, 40, 'K1, K2 Dickson & Millero (1987)'],
  kb: [0, 45, 5, 45, 'KB Dickson (1990)'],
  kw: [0, 45, 0, 45, 'KW Millero (1995)'],
  ks: [0, 45, 5, 45, 'KS Dickson (1990)'],
  kf: [9, 33, 10, 40, 'KF Perez & Fraga (1987)'],
  ksp: [5, 40, 5, 44, 'Ksp Mucci (1983)'],
};

/**
 * Every constant and total needed by the solver at one (S, t, P), mol/kg units, total pH scale unless noted.
 * Plain numbers in a fixed shape so the hot path reads fields without allocation.
 */
export interface EquilibriumConstants extends FitTerms {
  tempC: number;
  seaPressureDbar: number;
  /** K0, mol kg-1 atm-1 (no pressure correction: it applies at the sea surface). */
  k0: number;
  k1: number;
  k2: number;
  kb: number;
  /** KW, mol2 kg-2 (total scale). */
  kw: number;
  /** KS and KF on the free scale, pressure corrected. */
  ks: number;
  kf: number;
  kp1: number;
  kp2: number;
  kp3: number;
  ksi: number;
  /** Solubility products, mol2 kg-2. */
  kspAr: number;
  kspCa: number;
  /** Totals, mol/kg. */
  bt: number;
  st: number;
  ft: number;
  ca: number;
  /** [H]T/[H]F = 1 + ST/KS. */
  totalPerFree: number;
  /** [H]SWS/[H]T = (1 + ST/KS + FT/KF)/(1 + ST/KS). */
  swsPerTotal: number;
  /** Weiss (1974) virial coefficients B and delta, cm3 mol-1. */
  virialB: number;
  virialDelta: number;
  /** 1 to keep the (1 - xCO2)^2 factor of Weiss (1974), 0 for the dilute limit (option fugacity). */
  virialMoleFraction: number;
  /** Bits of RANGE_BITS for fits used outside their range. */
  rangeMask: number;
}

/** Fills in defaults and rejects unknown names with a message listing the valid ones. */
export function resolveCarbonateOptions(options?: CarbonateOptions): ResolvedCarbonateOptions {
  const carbonicConstants = options?.carbonicConstants ?? DEFAULT_CARBONATE_OPTIONS.carbonicConstants;
  const boron = options?.boron ?? DEFAULT_CARBONATE_OPTIONS.boron;
  const kw = options?.kw ?? DEFAULT_CARBONATE_OPTIONS.kw;
  const fugacity = options?.fugacity ?? DEFAULT_CARBONATE_OPTIONS.fugacity;
  check('carbonicConstants', carbonicConstants, CARBONATE_OPTION_NAMES.carbonicConstants);
  check('boron', boron, CARBONATE_OPTION_NAMES.boron);
  check('kw', kw, CARBONATE_OPTION_NAMES.kw);
  check('fugacity', fugacity, CARBONATE_OPTION_NAMES.fugacity);
  return { carbonicConstants, boron, kw, fugacity };
}

function check(key: string, value: string, valid: readonly string[]): void {
  if (!valid.includes(value)) {
    throw CARBONATE_ERRORS.error(
      'REEFD_CARBONATE_BAD_OPTION',
      `carbonate option ${key} = "${value}" is unknown; use one of ${valid.join(', ')}`,
    );
  }
}

/** A zeroed constants object with the final shape (for reuse with equilibriumConstantsInto). */
export function createConstants(): EquilibriumConstants {
  return {
    salinity: 0,
    sqrtS: 0,
    tempK: 0,
    lnT: 0,
    tempC: 0,
    seaPressureDbar: 0,
    k0: 0,
    k1: 0,
    k2: 0,
    kb: 0,
    kw: 0,
    ks: 0,
    kf: 0,
    kp1: 0,
    kp2: 0,
    kp3: 0,
    ksi: 0,
    kspAr: 0,
    kspCa: 0,
    bt: 0,
    st: 0,
    ft: 0,
    ca: 0,
    totalPerFree: 0,
    swsPerTotal: 0,
    virialB: 0,
    virialDelta: 0,
    virialMoleFraction: 1,
    rangeMask: 0,
  };
}

/**
 * Evaluates all constants at practical salinity S, t degC and sea pressure P dbar.
 * Check values at S 35, t 25, P 0 (Dickson, Sabine & Christian 2007): ln K0 -3.5617, log10 K1 -5.8472,
 * log10 K2 -8.9660, ln KB -19.7964, ln KW -30.434, ln KS -2.30, ln KF -6.09 (see equilibrium.test.ts).
 */
export function equilibriumConstants(
  salinity: number,
  tempC: number,
  seaPressureDbar = 0,
  options?: CarbonateOptions,
): EquilibriumConstants {
  const out = createConstants();
  equilibriumConstantsInto(out, salinity, tempC, seaPressureDbar, resolveCarbonateOptions(options));
  return out;
}

/**
 * Allocation-free form of equilibriumConstants, writing into `out` (options already resolved). With
 * `nutrients` false the phosphate and silicate constants are left NaN (a solve that then uses phosphate
 * or silicate fails loudly instead of silently), which saves four exponentials on the hot path.
 */
export function equilibriumConstantsInto(
  out: EquilibriumConstants,
  salinity: number,
  tempC: number,
  seaPressureDbar: number,
  options: ResolvedCarbonateOptions,
  nutrients = true,
): EquilibriumConstants {
  const tempK = tempC + 273.15;
  const pBar = seaPressureDbar / 10;
  const s = salinity;
  out.salinity = s;
  out.sqrtS = Math.sqrt(s);
  out.tempK = tempK;
  out.lnT = Math.log(tempK);
  out.tempC = tempC;
  out.seaPressureDbar = seaPressureDbar;

  const st = totalSulfate(s);
  const ft = totalFluoride(s);
  out.st = st;
  out.ft = ft;
  out.bt = options.boron === 'uppstrom1974' ? totalBoronUppstrom1974(s) : totalBoronLee2010(s);
  out.ca = totalCalcium(s);

  // Scale factor at 1 atm, for moving total-scale fits to the seawater scale before the pressure step.
  const ks0 = ksDickson1990(out);
  const kf0 = kfPerezFraga1987(out);
  const swsPerTotal0 = (1 + st / ks0 + ft / kf0) / (1 + st / ks0);
  const ks = ks0 * pressureFactor(PRESSURE_COEFFS.ks, tempC, tempK, pBar);
  const kf = kf0 * pressureFactor(PRESSURE_COEFFS.kf, tempC, tempK, pBar);
  out.ks = ks;
  out.kf = kf;
  const totalPerFree = 1 + st / ks;
  const swsPerTotal = (totalPerFree + ft / kf) / totalPerFree;
  out.totalPerFree = totalPerFree;
  out.swsPerTotal = swsPerTotal;

  // Seawater-scale values at 1 atm.
  let k1Sws: number;
  let k2Sws: number;
  if (options.carbonicConstants === 'dickson-millero1987') {
    k1Sws = k1DicksonMillero1987Sws(out);
    k2Sws = k2DicksonMillero1987Sws(out);
  } else {
    k1Sws = k1Lueker2000(out) * swsPerTotal0;
    k2Sws = k2Lueker2000(out) * swsPerTotal0;
  }
  const kbSws = kbDickson1990(out) * swsPerTotal0;
  const kwSws =
    options.kw === 'millero1995-sws' ? kwMillero1995Sws(out) : kwMillero1995Total(out) * swsPerTotal0;
  let ksiSws = NaN;
  if (nutrients) {
    kpYaoMillero1995Sws(out, out); // seawater scale, corrected in place below
    ksiSws = ksiYaoMillero1995Sws(out);
  } else {
    out.kp1 = NaN;
    out.kp2 = NaN;
    out.kp3 = NaN;
  }

  // Pressure, then to the total scale with the pressure-corrected KS, KF.
  const toTotal = 1 / swsPerTotal;
  out.k1 = k1Sws * pressureFactor(PRESSURE_COEFFS.k1, tempC, tempK, pBar) * toTotal;
  out.k2 = k2Sws * pressureFactor(PRESSURE_COEFFS.k2, tempC, tempK, pBar) * toTotal;
  out.kb = kbSws * pressureFactor(PRESSURE_COEFFS.kb, tempC, tempK, pBar) * toTotal;
  out.kw = kwSws * pressureFactor(PRESSURE_COEFFS.kw, tempC, tempK, pBar) * toTotal;
  if (nutrients) {
    out.kp1 *= pressureFactor(PRESSURE_COEFFS.kp1, tempC, tempK, pBar) * toTotal;
    out.kp2 *= pressureFactor(PRESSURE_COEFFS.kp2, tempC, tempK, pBar) * toTotal;
    out.kp3 *= pressureFactor(PRESSURE_COEFFS.kp3, tempC, tempK, pBar) * toTotal;
    out.ksi = ksiSws * pressureFactor(PRESSURE_COEFFS.ksi, tempC, tempK, pBar) * toTotal;
  } else out.ksi = NaN;
  out.kspAr = kspAragoniteMucci1983(out) * pressureFactor(PRESSURE_COEFFS.kspAr, tempC, tempK, pBar);
  out.kspCa = kspCalciteMucci1983(out) * pressureFactor(PRESSURE_COEFFS.kspCa, tempC, tempK, pBar);
  out.k0 = k0Weiss1974(s, tempK, out.lnT);
  out.virialB = virialBWeiss1974(tempK);
  out.virialDelta = virialDeltaWeiss1974(tempK);
  out.virialMoleFraction = options.fugacity === 'weiss1974-dilute' ? 0 : 1;

  // Published ranges (FIT_RANGES), inlined: string-keyed lookups cost more than the fits on this path.
  let mask = 0;
  if (tempC < -1 || tempC > 40 || s > 40) mask |= RANGE_BITS.k0;
  if (options.carbonicConstants === 'lueker2000') {
    if (tempC < 2 || tempC > 35 || s < 19 || s > 43) mask |= RANGE_BITS.k1k2;
  } else if (tempC < 2 || tempC > 35 || s < 20 || s > 40) mask |= RANGE_BITS.k1k2;
  if (tempC < 0 || tempC > 45 || s < 5 || s > 45) mask |= RANGE_BITS.kb | RANGE_BITS.ks;
  if (tempC < 0 || tempC > 45 || s > 45) mask |= RANGE_BITS.kw;
  if (tempC < 9 || tempC > 33 || s < 10 || s > 40) mask |= RANGE_BITS.kf;
  if (tempC < 5 || tempC > 40 || s < 5 || s > 44) mask |= RANGE_BITS.ksp;
  out.rangeMask = mask;
  return out;
}

/** Human-readable notes for the fits flagged in `mask` (for flag 3 results). */
export function rangeNotes(
  mask: number,
  options: ResolvedCarbonateOptions,
  tempC: number,
  salinity: number,
): string[] {
  const notes: string[] = [];
  const add = (bit: number, key: string): void => {
    const r = FIT_RANGES[key];
    if ((mask & bit) !== 0 && r !== undefined) {
      notes.push(
        `${r[4]} is fitted for t ${r[0]} to ${r[1]} degC and S ${r[2]} to ${r[3]}; evaluated at t ${tempC}, S ${salinity} (flag 3)`,
      );
    }
  };
  add(RANGE_BITS.k0, 'k0');
  add(RANGE_BITS.k1k2, options.carbonicConstants);
  add(RANGE_BITS.kb, 'kb');
  add(RANGE_BITS.kw, 'kw');
  add(RANGE_BITS.ks, 'ks');
  add(RANGE_BITS.kf, 'kf');
  add(RANGE_BITS.ksp, 'ksp');
  return notes;
}
