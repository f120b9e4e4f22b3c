// Eulerian control-volume budget of a reef flat (Falter et al. 2008, J. Geophys. Res. 113, C07035), on the
// alkalinity-anomaly basis (Smith 1973; Smith & Key 1975; Kinsey 1978): per unit bed area between the upstream
// station A and the downstream station B,
//   rho h (dC/dt + U dC/dx) = F_b - F_as                       (docs/methods/metabolism.md 6.1, docs/contract-v1.md "flux")
// with St = (Cm_k - Cm_{k-1})/W, Cm = (C_A + C_B)/2 (backward, so live equals replay) and Ad = U (C_B - C_A)/L.
// Concentrations in umol/kg, rates in umol kg-1 s-1, fluxes in umol m-2 s-1 (reported x 3.6 as mmol m-2 h-1).

/** umol m-2 s-1 to mmol m-2 h-1 (3600 s/h / 1000). */
export const UMOL_M2_S_TO_MMOL_M2_H = 3.6;

/** Storage rate dC/dt [umol kg-1 s-1] from the station means of two windows dtS seconds apart (backward). */
export function storageRate(
  cUpNow: number,
  cDownNow: number,
  cUpPrev: number,
  cDownPrev: number,
  dtS: number,
): number {
  return (0.5 * (cUpNow + cDownNow) - 0.5 * (cUpPrev + cDownPrev)) / dtS;
}

/** Advection U dC/dx [umol kg-1 s-1], with dC/dx = (C_down - C_up)/L and U > 0 from up to down. */
export function advectionRate(uMS: number, cUp: number, cDown: number, lengthM: number): number {
  return (uMS * (cDown - cUp)) / lengthM;
}

/**
 * Benthic flux F_b = rho h (St + Ad) + F_as [umol m-2 s-1] (docs/methods/metabolism.md 6.3), rho in kg m-3, h in m,
 * St and Ad in umol kg-1 s-1, F_as positive water to air. Check: rho 1025, h 1, Ad 1e-3, St 0, F_as 0.1 gives
 * 1.125 (algebra).
 */
export function benthicFluxUmolM2S(
  rhoKgM3: number,
  depthM: number,
  storage: number,
  advection: number,
  airSeaUmolM2S: number,
): number {
  return rhoKgM3 * depthM * (storage + advection) + airSeaUmolM2S;
}

/** Steadiness measure |St|/(|St| + |Ad|) in [0, 1] (docs/methods/metabolism.md 6.6); 0 when both vanish. */
export function storageFraction(storage: number, advection: number): number {
  const den = Math.abs(storage) + Math.abs(advection);
  return den > 0 ? Math.abs(storage) / den : 0;
}

export interface FluxSigmaInput {
  rhoKgM3: number;
  depthM: number;
  uMS: number;
  lengthM: number;
  /** C_B - C_A [umol/kg] */
  dC: number;
  storage: number;
  advection: number;
  sigmaStorage: number;
  sigmaUMS: number;
  /** sigma of C_B - C_A [umol/kg]: inter-calibration, not absolute accuracy (docs/methods/uncertainty.md 9.2) */
  sigmaDC: number;
  sigmaLengthM: number;
  sigmaDepthM: number;
  sigmaAirSeaUmolM2S: number;
}

/**
 * First-order sigma of F = rho h (St + Ad) + F_as [umol m-2 s-1] (docs/methods/uncertainty.md 9.2):
 * s^2 = (rho h)^2 [s_St^2 + (dC/L)^2 s_U^2 + (U/L)^2 s_dC^2 + (U dC/L^2)^2 s_L^2] + (rho (St + Ad))^2 s_h^2 + s_Fas^2.
 */
export function fluxSigmaUmolM2S(x: FluxSigmaInput): number {
  const rh = x.rhoKgM3 * x.depthM;
  const L = x.lengthM;
  const inner =
    x.sigmaStorage ** 2 +
    ((x.dC / L) * x.sigmaUMS) ** 2 +
    ((x.uMS / L) * x.sigmaDC) ** 2 +
    (((x.uMS * x.dC) / (L * L)) * x.sigmaLengthM) ** 2;
  const hTerm = x.rhoKgM3 * (x.storage + x.advection) * x.sigmaDepthM;
  return Math.sqrt(rh * rh * inner + hTerm * hTerm + x.sigmaAirSeaUmolM2S ** 2);
}

/**
 * Steady forward model (docs/methods/metabolism.md 6.4): C_B = C_A + Q L/U, Q = (F_b - F_as)/(rho h) [umol kg-1 s-1].
 * Check: C_A 200, Q 1e-3, L 350, U 0.05 gives 207 (algebra).
 */
export function forwardSteady(cUp: number, qPerS: number, uMS: number, lengthM: number): number {
  return cUp + (qPerS * lengthM) / uMS;
}

/**
 * Forward model with storage (docs/methods/metabolism.md 6.4): the C_B,k that makes the discrete budget of window k exact,
 * C_B,k = [Q - (C_A,k - C_A,k-1 - C_B,k-1)/(2W) + U C_A,k/L] / [1/(2W) + U/L], W = dtS the window step [s].
 * An error in C_B,k-1 decays by tau/(tau + 2W) per step (tau = L/U).
 */
export function forwardWithStorage(
  cUpNow: number,
  cUpPrev: number,
  cDownPrev: number,
  qPerS: number,
  uMS: number,
  lengthM: number,
  dtS: number,
): number {
  const w2 = 2 * dtS;
  return (qPerS - (cUpNow - cUpPrev - cDownPrev) / w2 + (uMS * cUpNow) / lengthM) / (1 / w2 + uMS / lengthM);
}
