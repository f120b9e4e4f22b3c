// The pCO2 + O2 inverse of one transect window (docs/methods/metabolism.md 6.5): its input from the window's
// station means and O2 budget, the storage form chained from the previous window's state (else the steady form),
// the root, the state the next window starts from, and the first-order sigma (docs/methods/uncertainty.md 9.2).
// computeTransectFlux runs it where no TA gradient is measured (NEC by the inverse) and, so that the chain of
// states does not break, also in windows whose NEC comes from the TA budget (bottle windows, 6.5).
import type { AirSeaFluxes } from './air-sea.js';
import { DEFAULT_CONSTANT_SIGMAS } from './chem.js';
import { inverseNecSigmaSplit, solveInverseNec, type InverseInput } from './inverse.js';
import { taSigma } from './nec-ta.js';
import type { InverseState, StationWindowMean, TransectParams } from './types.js';

const sigPco2 = (s: StationWindowMean, p: number) => s.sigmaPco2Uatm ?? Math.max(2, 0.01 * p);

/**
 * Upstream TA of the inverse [umol/kg]: a TA that is there in every window (a TA sensor, or the caller's TA),
 * else TA from salinity. A bottle's TA is not used even when the window holds one: it is there in a few windows
 * only, and the storage form differences the upstream TA of consecutive windows, so a TA that switches between
 * a bottle and salinity would read as a jump of TA and DIC in the water (docs/methods/metabolism.md 6.5).
 */
export function inverseUpstreamTa(up: StationWindowMean, params: TransectParams): number {
  const fromSalinity = (params.taS35UmolKg * up.salinity) / 35;
  if (up.taSource === 'sample') return fromSalinity;
  return up.taUmolKg ?? fromSalinity;
}

export interface InverseWindowInput {
  up: StationWindowMean;
  down: StationWindowMean;
  tCentreMs: number;
  uMS: number;
  depthM: number;
  rhoKgM3: number;
  /** Window step to the previous window [s] (for the storage form). */
  dtS: number;
  /** O2 budget pieces of the window (the NCP the inverse takes). */
  o2StorageUmolKgS: number;
  o2DiffUmolKg: number;
  airSea: AirSeaFluxes;
  baroHpa: number | undefined;
  /** The previous window's inverse state, when the storage form applies (else the steady form). */
  previous: InverseState | undefined;
  /**
   * Sigmas for the uncertainty step (undefined: no sigma): of U and h, and the O2-only part of sigma(NCP) split
   * into what persists from window to window (inter-calibration, exchange) and what does not (means' errors).
   */
  sigmas?: { uMS: number; depthM: number; ncpO2SysUmolM2S: number; ncpO2RandUmolM2S: number };
}

export type InverseWindowResult =
  | {
      ok: true;
      necUmolM2S: number;
      sigmaNecUmolM2S: number | null;
      state: InverseState;
      /** True when the steady form was used (no previous state). */
      steady: boolean;
    }
  | { ok: false; code: string; reason: string; steady: boolean };

function inputOf(w: InverseWindowInput, params: TransectParams, taA: number): InverseInput {
  const p = w.previous;
  return {
    upTempC: w.up.tempC,
    upSalinity: w.up.salinity,
    upPco2Uatm: w.up.pco2Uatm as number,
    upTaUmolKg: taA,
    downTempC: w.down.tempC,
    downSalinity: w.down.salinity,
    downPco2Uatm: w.down.pco2Uatm as number,
    o2StorageUmolKgS: w.o2StorageUmolKgS,
    o2DiffUmolKg: w.o2DiffUmolKg,
    fasO2UmolM2S: w.airSea.fasO2UmolM2S,
    ncpOffsetUmolM2S: 0,
    pq: params.pq,
    fasCo2UmolM2S: w.airSea.fasCo2UmolM2S ?? 0,
    uMS: w.uMS,
    depthM: w.depthM,
    rhoKgM3: w.rhoKgM3,
    lengthM: params.lengthM,
    baroHpa: w.baroHpa ?? 1013.25,
    ...(p
      ? {
          previous: {
            dtS: w.dtS,
            upTaUmolKg: p.upTaUmolKg,
            upDicUmolKg: p.upDicUmolKg,
            upSalinity: p.upSalinity,
            downTaUmolKg: p.downTaUmolKg,
            downDicUmolKg: p.downDicUmolKg,
            downSalinity: p.downSalinity,
          },
        }
      : {}),
  };
}

/** The inverse NEC of one window [umol m-2 s-1], its sigma and the state the next window starts from. */
export function inverseWindow(w: InverseWindowInput, params: TransectParams): InverseWindowResult {
  const taA = inverseUpstreamTa(w.up, params);
  const steady = w.previous === undefined;
  const x = inputOf(w, params, taA);
  const r = solveInverseNec(x, {
    bracketMmolM2H: params.necBracketMmolM2H,
    maxDoublings: params.necMaxDoublings,
    tolMmolM2H: params.necTolMmolM2H,
  });
  if (!r.ok) return { ok: false, code: r.code, reason: r.reason, steady };
  const state: InverseState = {
    tCentreMs: w.tCentreMs,
    upTaUmolKg: taA,
    upDicUmolKg: r.upDicUmolKg,
    upSalinity: w.up.salinity,
    downTaUmolKg: r.downTaUmolKg,
    downDicUmolKg: r.downDicUmolKg,
    downSalinity: w.down.salinity,
  };
  let sigma: number | null = null;
  if (w.sigmas) {
    const { up, down, airSea: as } = w;
    const upP = up.pco2Uatm as number;
    const downP = down.pco2Uatm as number;
    const sigmaDeqCo2 = 0.5 * Math.hypot(sigPco2(up, upP), sigPco2(down, downP));
    const fas = as.fasCo2UmolM2S ?? 0;
    // docs/methods/uncertainty.md 9.2: errors that persist from window to window (calibrations, constants)
    // through the steady form, the windows' own (the means' standard errors) through the storage form.
    sigma = inverseNecSigmaSplit(
      x,
      r.necUmolM2S,
      r.dgdN,
      {
        upPco2Uatm: sigPco2(up, upP),
        downPco2Uatm: sigPco2(down, downP),
        upTaUmolKg: taSigma(up, params.sigmaTaFromSalinityUmolKg),
        upTempC: up.sigmaTempC ?? 0.01,
        downTempC: down.sigmaTempC ?? 0.01,
        upSalinity: up.sigmaSalinity ?? 0.02,
        downSalinity: down.sigmaSalinity ?? 0.02,
        ncpOffsetUmolM2S: w.sigmas.ncpO2SysUmolM2S,
        pq: params.sigmaPq,
        fasCo2UmolM2S: Math.hypot(
          fas * params.sigmaKRel,
          as.kCo2MS * w.rhoKgM3 * as.k0MolKgAtm * sigmaDeqCo2,
        ),
        uMS: w.sigmas.uMS,
        depthM: w.sigmas.depthM,
        lengthM: params.sigmaLengthM,
        // Constants shared by both stations (Orr et al. 2018 via libs/carbonate): they largely cancel.
        dpK0: DEFAULT_CONSTANT_SIGMAS.pK0,
        dpK1: DEFAULT_CONSTANT_SIGMAS.pK1,
        dpK2: DEFAULT_CONSTANT_SIGMAS.pK2,
        dpKB: DEFAULT_CONSTANT_SIGMAS.pKB,
        dpKW: DEFAULT_CONSTANT_SIGMAS.pKW,
        dBtRel: DEFAULT_CONSTANT_SIGMAS.btRel,
      },
      {
        upPco2Uatm: up.semPco2Uatm ?? 0,
        downPco2Uatm: down.semPco2Uatm ?? 0,
        ncpOffsetUmolM2S: w.sigmas.ncpO2RandUmolM2S,
      },
    ).sigmaUmolM2S;
  }
  return { ok: true, necUmolM2S: r.necUmolM2S, sigmaNecUmolM2S: sigma, state, steady };
}
