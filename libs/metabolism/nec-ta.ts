// NEC from the alkalinity budget (`nec_method: ta`) and NCP_C from the DIC budget (docs/methods/metabolism.md 6.3): the
// alkalinity-anomaly method (Smith & Key 1975; Kinsey 1978; Chisholm & Gattuso 1991) on salinity-normalised
// TA and DIC, nX = X S0/S (Friis et al. 2003), in the same control volume as the O2 budget.

import { advectionRate, benthicFluxUmolM2S, fluxSigmaUmolM2S, storageRate } from './budget.js';
import type { StationWindowMean } from './types.js';

export interface BudgetContext {
  rhoKgM3: number;
  depthM: number;
  uMS: number;
  lengthM: number;
  /** Window-mean salinity of the normalisation. */
  s0: number;
  dtS: number;
  sigmaUMS: number;
  sigmaDepthM: number;
  sigmaLengthM: number;
  /** Previous window's stations (already role-swapped), when storage applies. */
  prevUp?: StationWindowMean;
  prevDown?: StationWindowMean;
}

/** True when the station mean has a TA that carries a biological gradient (measured or sampled). */
export function hasGradientTa(s: StationWindowMean): boolean {
  return Number.isFinite(s.taUmolKg) && s.taSource !== undefined && s.taSource !== 'salinity';
}

/** Default sigma of a station's TA [umol/kg] (docs/methods/uncertainty.md 9.3): salinity regression residual, else 3. */
export function taSigma(s: StationWindowMean, fromSalinity: number): number {
  return s.sigmaTaUmolKg ?? (s.taSource === 'salinity' || s.taSource === undefined ? fromSalinity : 3);
}

export interface TaBudget {
  /** NEC [umol m-2 s-1] = -0.5 rho h (St + Ad)_nTA. */
  necUmolM2S: number;
  sigmaNecUmolM2S: number;
  storage: number;
  advection: number;
  hasStorage: boolean;
}

/** NEC from TA measured or sampled at both stations (the caller checks hasGradientTa). */
export function taBudget(
  ctx: BudgetContext,
  up: StationWindowMean,
  down: StationWindowMean,
  sigmaTaSal: number,
): TaBudget {
  const { s0, prevUp: pU, prevDown: pD } = ctx;
  const nTaA = ((up.taUmolKg as number) * s0) / up.salinity;
  const nTaB = ((down.taUmolKg as number) * s0) / down.salinity;
  const hasStorage = pU !== undefined && pD !== undefined && hasGradientTa(pU) && hasGradientTa(pD);
  const st =
    pU && pD && hasStorage
      ? storageRate(
          nTaA,
          nTaB,
          ((pU.taUmolKg as number) * s0) / pU.salinity,
          ((pD.taUmolKg as number) * s0) / pD.salinity,
          ctx.dtS,
        )
      : 0;
  const ad = advectionRate(ctx.uMS, nTaA, nTaB, ctx.lengthM);
  const semNow = 0.5 * Math.hypot(up.semTaUmolKg ?? 0, down.semTaUmolKg ?? 0);
  const semPrev = pU && pD && hasStorage ? 0.5 * Math.hypot(pU.semTaUmolKg ?? 0, pD.semTaUmolKg ?? 0) : 0;
  // NEC from TA has no air-sea term and a factor 0.5 (docs/methods/uncertainty.md 9.2).
  const sigma =
    0.5 *
    fluxSigmaUmolM2S({
      rhoKgM3: ctx.rhoKgM3,
      depthM: ctx.depthM,
      uMS: ctx.uMS,
      lengthM: ctx.lengthM,
      dC: nTaB - nTaA,
      storage: st,
      advection: ad,
      sigmaStorage: hasStorage ? Math.hypot(semNow, semPrev) / ctx.dtS : 0,
      sigmaUMS: ctx.sigmaUMS,
      sigmaDC: Math.hypot(taSigma(up, sigmaTaSal), taSigma(down, sigmaTaSal)),
      sigmaLengthM: ctx.sigmaLengthM,
      sigmaDepthM: ctx.sigmaDepthM,
      sigmaAirSeaUmolM2S: 0,
    });
  return {
    necUmolM2S: -0.5 * benthicFluxUmolM2S(ctx.rhoKgM3, ctx.depthM, st, ad, 0),
    sigmaNecUmolM2S: sigma,
    storage: st,
    advection: ad,
    hasStorage,
  };
}

/**
 * NCP_C [umol m-2 s-1] from DIC with measured TA (docs/methods/metabolism.md 6.3):
 * NCP_C = -rho h (St + Ad)_(nDIC - nTA/2) - F_as,CO2. Needs DIC at both stations.
 */
export function ncpCFromDic(
  ctx: BudgetContext,
  up: StationWindowMean,
  down: StationWindowMean,
  ta: TaBudget,
  fasCo2UmolM2S: number,
): number {
  const { s0, prevUp: pU, prevDown: pD } = ctx;
  const nDicA = ((up.dicUmolKg as number) * s0) / up.salinity;
  const nDicB = ((down.dicUmolKg as number) * s0) / down.salinity;
  const st =
    pU?.dicUmolKg !== undefined && pD?.dicUmolKg !== undefined && ta.hasStorage
      ? storageRate(
          nDicA,
          nDicB,
          (pU.dicUmolKg * s0) / pU.salinity,
          (pD.dicUmolKg * s0) / pD.salinity,
          ctx.dtS,
        )
      : 0;
  const ad = advectionRate(ctx.uMS, nDicA, nDicB, ctx.lengthM);
  // When DIC has no storage term, TA's is dropped too, so that the pair stays consistent.
  const stTa = st === 0 ? 0 : ta.storage;
  return (
    -benthicFluxUmolM2S(ctx.rhoKgM3, ctx.depthM, st - 0.5 * stTa, ad - 0.5 * ta.advection, 0) - fasCo2UmolM2S
  );
}
