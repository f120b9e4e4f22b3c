// Transect fluxes per window (docs/methods/metabolism.md 6.1-6.6; docs/methods/uncertainty.md 9.2;
// docs/contract-v1.md `flux`): NCP from the O2 budget, NEC from the alkalinity budget (`ta`) or the pCO2 + O2
// inverse (`inverse`), validity and first-order uncertainties. Method: Eulerian control volume of Falter et
// al. (2008, J. Geophys. Res.), alkalinity anomaly of Smith (1973) and Kinsey (1978); salinity normalisation
// of Friis et al. (2003, Geophys. Res. Lett.).

import { airSeaFluxes, type AirSeaFluxes } from './air-sea.js';
import {
  advectionRate,
  benthicFluxUmolM2S,
  fluxSigmaUmolM2S,
  storageFraction,
  UMOL_M2_S_TO_MMOL_M2_H,
} from './budget.js';
import { o2Storage, type StorageTerm } from './storage.js';
import { inverseNec, taNec, type NecParts } from './transect-nec.js';
import { addReason, orientSegment, sigO2, worst, type Segment, type WindowLog } from './transect-segment.js';
import type { FluxResult, QcFlag, StationWindowMean, TransectParams, TransectWindow } from './types.js';

export { transportScale } from './transect-segment.js';

export interface ComputeFluxOptions {
  /** The result of the previous window: its inverse solution starts the storage form of the inverse. */
  previousResult?: FluxResult;
  /**
   * The next window (starting where this one ends): with it and a previous window the O2 storage term is the
   * centred difference (storage.ts, note `storage_centred`). The inverse's carbon storage stays backward.
   */
  next?: TransectWindow;
  /** Skip the uncertainty propagation (sigmas null) for speed. Default true (propagate). */
  uncertainty?: boolean;
  /**
   * Also run the pCO2 + O2 inverse where NEC comes from the TA budget (default true), so its storage form
   * continues through bottle windows (docs/methods/metabolism.md 6.5); false restarts it after each.
   */
  inverseWithTa?: boolean;
}

/** The flags of the window's inputs: physics (T, S, depth, current), O2 and pCO2. */
function inputFlags(seg: Segment) {
  const { up, down, current } = seg;
  // Non-finite inputs count as missing (flag 9): the outputs become null, never NaN.
  const finiteState = (x: StationWindowMean) =>
    Number.isFinite(x.tempC) && Number.isFinite(x.salinity) && Number.isFinite(x.depthM);
  const physOk = finiteState(up) && finiteState(down) && Number.isFinite(seg.u) && Number.isFinite(seg.rho);
  const physFlag = physOk ? worst(up.flag, down.flag, current.currentFlag) : 9;
  const o2Ok = Number.isFinite(up.o2UmolKg) && Number.isFinite(down.o2UmolKg);
  const o2Flag = o2Ok ? worst(physFlag, up.o2Flag, down.o2Flag) : 9;
  const pco2Flag = worst(physFlag, up.pco2Flag ?? up.flag, down.pco2Flag ?? down.flag);
  const pco2Present = Number.isFinite(up.pco2Uatm) && Number.isFinite(down.pco2Uatm);
  const pco2Mean = pco2Present ? 0.5 * ((up.pco2Uatm as number) + (down.pco2Uatm as number)) : undefined;
  return { physFlag, o2Flag, pco2Flag, pco2Present, pco2Mean };
}

/** Air-sea exchange from transect means. */
function exchangeTerms(
  seg: Segment,
  pco2Mean: number | undefined,
  pco2Flag: QcFlag,
  log: WindowLog,
): AirSeaFluxes {
  const { current, params, up, down, u, residenceS } = seg;
  if (current.windMS === undefined) log.notes.push('no_wind');
  if (current.baroHpa === undefined) log.notes.push('no_baro');
  const xco2 = current.xco2AirPpm ?? params.xco2AirPpm;
  if (current.xco2AirPpm === undefined) log.notes.push('xco2_configured');
  const as = airSeaFluxes({
    tempC: seg.tMean,
    salinity: seg.sMean,
    rhoKgM3: seg.rho,
    o2UmolKg: up.o2UmolKg,
    o2DownUmolKg: down.o2UmolKg,
    o2Mean: params.airSeaO2Mean,
    residenceS: u !== 0 ? params.lengthM / u : residenceS, // signed: reversed flow weights the other station
    depthM: seg.h,
    ...(pco2Mean !== undefined && pco2Flag < 4 ? { pco2Uatm: pco2Mean } : {}),
    ...(current.windMS !== undefined ? { windMS: current.windMS } : {}),
    windHeightM: current.windHeightM ?? params.windHeightM,
    ...(current.baroHpa !== undefined ? { baroHpa: current.baroHpa } : {}),
    xco2AirPpm: xco2,
  });
  if (current.metFlag !== undefined) log.flag = worst(log.flag, current.metFlag >= 4 ? 3 : current.metFlag);
  // docs/methods/conventions.md 1.5: a defaulted barometer makes the dependent values (here the exchange terms) suspect.
  if (current.windMS !== undefined && current.baroHpa === undefined) log.flag = worst(log.flag, 3);
  return as;
}

/** The O2 budget's outputs: NCP, its sigma and the O2-only parts of it that the inverse NEC inherits. */
export interface O2Budget {
  stO2: number;
  dO2: number;
  ncp: number | null;
  sigmaNcp: number | null;
  stFrac: number | null;
  // The O2-only part of sigma(NCP) that the inverse NEC inherits, split into what persists from window to
  // window (the optodes' inter-calibration, the exchange term) and what does not (the means' standard errors).
  sigmaNcpO2Sys: number;
  sigmaNcpO2Rand: number;
}

/** The O2 storage term: centred with a next window near enough, else backward (storage.ts). */
function o2StorageTerm(seg: Segment, next: TransectWindow | undefined, log: WindowLog): StorageTerm {
  const { current, params, up, down, pU, pD } = seg;
  const nx = next;
  const dtNextS = nx ? (nx.tCentreMs - current.tCentreMs) / 1000 : Number.NaN;
  const useNext = nx !== undefined && seg.hasPrev && dtNextS > 0 && dtNextS <= params.maxPreviousGapMin * 60;
  const storage = o2Storage(
    { up, down },
    pU && pD ? { up: pU, down: pD } : undefined,
    seg.dtS,
    useNext ? { pair: { up: nx.up, down: nx.down }, dtS: dtNextS } : undefined,
  );
  if (storage.form === 'centred') log.notes.push('storage_centred');
  return storage;
}

/** sigma(NCP) and its O2-only systematic and random parts (docs/methods/uncertainty.md 9.2). */
function ncpSigmas(seg: Segment, storage: StorageTerm, dO2: number, adO2: number, as: AirSeaFluxes) {
  const { params, up, down, rho } = seg;
  const sigmaSt = storage.sigma;
  const sigmaDeq = 0.5 * Math.hypot(sigO2(up), sigO2(down));
  const sigmaFas = Math.hypot(as.fasO2UmolM2S * params.sigmaKRel, as.kO2MS * rho * sigmaDeq);
  // docs/methods/uncertainty.md 9.2: the station difference has the sensors' inter-calibration and the
  // random standard errors of the two window means.
  const semDC = Math.hypot(up.semO2UmolKg ?? 0, down.semO2UmolKg ?? 0);
  const base = {
    rhoKgM3: rho,
    depthM: seg.h,
    uMS: seg.u,
    lengthM: params.lengthM,
    dC: dO2,
    storage: storage.rate,
    advection: adO2,
    sigmaStorage: sigmaSt,
    sigmaDC: Math.hypot(sigO2(up), sigO2(down), semDC),
    sigmaAirSeaUmolM2S: sigmaFas,
  };
  const sigmaNcp = fluxSigmaUmolM2S({
    ...base,
    sigmaUMS: seg.sigmaU,
    sigmaLengthM: params.sigmaLengthM,
    sigmaDepthM: seg.sigmaH,
  });
  const o2Only = { ...base, sigmaUMS: 0, sigmaLengthM: 0, sigmaDepthM: 0 };
  const sigmaNcpO2Sys = fluxSigmaUmolM2S({
    ...o2Only,
    sigmaStorage: 0,
    sigmaDC: Math.hypot(sigO2(up), sigO2(down)),
  });
  const sigmaNcpO2Rand = fluxSigmaUmolM2S({ ...o2Only, sigmaDC: semDC, sigmaAirSeaUmolM2S: 0 });
  return { sigmaNcp, sigmaNcpO2Sys, sigmaNcpO2Rand };
}

/** O2 budget -> NCP. */
function o2Budget(
  seg: Segment,
  as: AirSeaFluxes,
  o2Flag: QcFlag,
  options: ComputeFluxOptions,
  log: WindowLog,
): O2Budget {
  const { params, up, down } = seg;
  const storage = o2StorageTerm(seg, options.next, log);
  const stO2 = storage.rate;
  const dO2 = down.o2UmolKg - up.o2UmolKg;
  const adO2 = advectionRate(seg.u, up.o2UmolKg, down.o2UmolKg, params.lengthM);
  const out: O2Budget = {
    stO2,
    dO2,
    ncp: null,
    sigmaNcp: null,
    stFrac: null,
    sigmaNcpO2Sys: 0,
    sigmaNcpO2Rand: 0,
  };
  if (o2Flag >= 4) {
    addReason(log, o2Flag === 9 ? 'input_missing' : 'input_qc_failed');
    log.flag = worst(log.flag, o2Flag);
    return out;
  }
  out.ncp = benthicFluxUmolM2S(seg.rho, seg.h, stO2, adO2, as.fasO2UmolM2S);
  log.flag = worst(log.flag, o2Flag);
  if (seg.hasPrev) {
    out.stFrac = storageFraction(stO2, adO2);
    // The steadiness test guards against the backward difference's error (storage.ts); a centred storage
    // term is second-order accurate where the concentration turns, and its window is not judged by it
    // (docs/methods/metabolism.md 6.6).
    if (out.stFrac > params.maxStorageFraction && storage.form !== 'centred')
      addReason(log, 'storage_dominates');
  }
  if (options.uncertainty ?? true) Object.assign(out, ncpSigmas(seg, storage, dO2, adO2, as));
  return out;
}

/** The flux record of a window from its segment, checks and budgets. */
function fluxResult(seg: Segment, log: WindowLog, o2: O2Budget, nec: NecParts, as: AirSeaFluxes): FluxResult {
  const valid = log.reasons.length === 0;
  if (!valid) log.flag = worst(log.flag, 3);
  const toMmol = (v: number | null) => (v === null ? null : v * UMOL_M2_S_TO_MMOL_M2_H);
  return {
    tCentreMs: seg.current.tCentreMs,
    ncpMmolM2H: toMmol(o2.ncp),
    sigmaNcpMmolM2H: toMmol(o2.sigmaNcp),
    necMmolM2H: toMmol(nec.nec),
    sigmaNecMmolM2H: toMmol(nec.sigmaNec),
    necMethod: nec.necMethod,
    ncpCMmolM2H: toMmol(nec.ncpC),
    uMS: seg.u,
    sigmaUMS: seg.sigmaU,
    depthM: seg.h,
    sigmaDepthM: seg.sigmaH,
    rhoKgM3: seg.rho,
    residenceMin: seg.residenceMin,
    angleOffDeg: seg.angle,
    swapped: seg.swapped,
    storageFractionO2: o2.stFrac,
    valid,
    invalidReasons: log.reasons,
    flag: log.flag,
    notes: log.notes,
    airSea: {
      u10MS: as.u10MS,
      kO2MS: as.kO2MS,
      kCo2MS: as.kCo2MS,
      o2SatUmolKg: as.o2SatUmolKg,
      fasO2MmolM2H: as.fasO2UmolM2S * UMOL_M2_S_TO_MMOL_M2_H,
      fasCo2MmolM2H: toMmol(as.fasCo2UmolM2S),
      fco2AirUatm: as.fco2AirUatm,
    },
    necFailure: nec.necFailure,
    inverseState: nec.inverseState,
    necInverseMmolM2H: toMmol(nec.necInverse),
  };
}

/**
 * Fluxes of one transect window. `previous` is the preceding window of the same transect (for storage);
 * without it (or further back than maxPreviousGapMin) storage is taken as zero and noted.
 */
export function computeTransectFlux(
  current: TransectWindow,
  previous: TransectWindow | undefined,
  params: TransectParams,
  options: ComputeFluxOptions = {},
): FluxResult {
  const wantSigma = options.uncertainty ?? true;
  const log: WindowLog = { reasons: [], notes: [], flag: 1 };
  const seg = orientSegment(current, previous, params, log);
  const flags = inputFlags(seg);
  const as = exchangeTerms(seg, flags.pco2Mean, flags.pco2Flag, log);
  const o2 = o2Budget(seg, as, flags.o2Flag, options, log);
  if (flags.physFlag >= 4) addReason(log, flags.physFlag === 9 ? 'input_missing' : 'input_qc_failed');
  log.flag = worst(log.flag, flags.physFlag);

  // NEC and NCP_C.
  const nec = taNec(seg, flags.physFlag, as, wantSigma, log);
  const { pco2Present, pco2Flag } = flags;
  const inverseWithTa = options.inverseWithTa ?? true;
  const previousResult = options.previousResult;
  inverseNec(seg, nec, { pco2Present, pco2Flag, o2, as, wantSigma, inverseWithTa, previousResult }, log);
  return fluxResult(seg, log, o2, nec, as);
}
