// Transect fluxes per window (docs/methods/metabolism.md 6.1-6.6; docs/methods/uncertainty.md 9.2;
// docs/contract-v1.md `flux`): NCP from the O2 budget, NEC from the alkalinity budget (`ta`) or the pCO2 + O2
// inverse (`inverse`), validity and first-order uncertainties. Method: Eulerian control volume of Falter et
// al. (2008, J. Geophys. Res.), alkalinity anomaly of Smith (1973) and Kinsey (1978); salinity normalisation
// of Friis et al. (2003, Geophys. Res. Lett.).

import { airSeaFluxes } from './air-sea.js';
import {
  advectionRate,
  benthicFluxUmolM2S,
  fluxSigmaUmolM2S,
  storageFraction,
  UMOL_M2_S_TO_MMOL_M2_H,
} from './budget.js';
import { densityKgM3 } from './chem.js';
import { alongBearingMS, angleOffBearingDeg, defaultCurrentSigmaMS } from './geometry.js';
import { inverseWindow } from './inverse-window.js';
import { o2Storage } from './storage.js';
import { hasGradientTa, ncpCFromDic, taBudget, type BudgetContext } from './nec-ta.js';
import type {
  FluxResult,
  InvalidReason,
  InverseState,
  QcFlag,
  StationWindowMean,
  TransectParams,
  TransectWindow,
} from './types.js';

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

const worst = (...flags: (QcFlag | undefined)[]): QcFlag => {
  let w: QcFlag = 1;
  for (const f of flags) if (f !== undefined && f > w) w = f;
  return w;
};

// Typical accuracies (docs/methods/uncertainty.md 9.3) used when a station mean carries no sigma.
const sigO2 = (s: StationWindowMean) => s.sigmaO2UmolKg ?? 0.02 * s.o2UmolKg;
const sigDepth = (s: StationWindowMean) => s.sigmaDepthM ?? 0.01; // ~1 hPa barometer + 0.05 % FS logger

/**
 * h_c / h: the factor from the current station's velocity to the segment's mean velocity (1 without a usable
 * depth at the current station). Check: h_c 1.5, h 1.35 gives 1.111 (algebra).
 */
export function transportScale(currentDepthM: number | undefined, meanDepthM: number): number {
  return currentDepthM !== undefined && currentDepthM > 0 && meanDepthM > 0 && Number.isFinite(currentDepthM)
    ? currentDepthM / meanDepthM
    : 1;
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
  const reasons: InvalidReason[] = [];
  const addReason = (r: InvalidReason) => {
    if (!reasons.includes(r)) reasons.push(r);
  };
  const notes: string[] = [];
  const L = params.lengthM;

  // Geometry: U on the bearing; reverse flow swaps roles or invalidates.
  let u = alongBearingMS(current.eastMS, current.northMS, params.bearingDeg);
  let angle = angleOffBearingDeg(current.eastMS, current.northMS, params.bearingDeg);
  let up = current.up;
  let down = current.down;
  let prevUp = previous?.up;
  let prevDown = previous?.down;
  let swapped = false;
  if (u < 0) {
    if (params.swapOnReverse) {
      [up, down] = [down, up];
      if (prevUp && prevDown) [prevUp, prevDown] = [prevDown, prevUp];
      u = -u;
      angle = 180 - angle;
      swapped = true;
    } else {
      addReason('reverse_flow');
    }
  }
  const h = 0.5 * (up.depthM + down.depthM);
  const sigmaH = 0.5 * Math.hypot(sigDepth(up), sigDepth(down));
  // Continuity (docs/methods/metabolism.md 6.1): the segment carries the volume flux per metre measured at the
  // current station, q = U_c h_c, so its mean velocity over the mean depth h is U = q / h.
  const toMean = transportScale(current.currentDepthM, h);
  const sigmaU = (current.sigmaUMS ?? defaultCurrentSigmaMS(u)) * toMean;
  u *= toMean;
  let flag: QcFlag = worst(up.flag, down.flag, current.currentFlag);
  if (Math.abs(u) < params.minSpeedMS) addReason('speed_below_min');
  if (angle > params.maxAngleDeg && !reasons.includes('reverse_flow')) {
    addReason('angle_off_transect');
    flag = worst(flag, angle <= params.suspectAngleDeg ? 3 : 4);
  }
  if (Math.min(up.depthM, down.depthM) < params.minDepthM) addReason('depth_below_min');
  const residenceS = u !== 0 ? L / Math.abs(u) : Number.POSITIVE_INFINITY;
  const residenceMin = Number.isFinite(residenceS) ? residenceS / 60 : null;
  if (residenceS / 60 > params.maxResidenceMin) addReason('residence_above_max');

  const rho = 0.5 * (densityKgM3(up.salinity, up.tempC) + densityKgM3(down.salinity, down.tempC));
  const tMean = 0.5 * (up.tempC + down.tempC);
  const sMean = 0.5 * (up.salinity + down.salinity);

  const dtS = previous ? (current.tCentreMs - previous.tCentreMs) / 1000 : Number.NaN;
  const hasPrev =
    prevUp !== undefined && prevDown !== undefined && dtS > 0 && dtS <= params.maxPreviousGapMin * 60;
  if (!hasPrev) notes.push('no_storage');
  const pU: StationWindowMean | undefined = hasPrev ? prevUp : undefined;
  const pD: StationWindowMean | undefined = hasPrev ? prevDown : undefined;

  // Non-finite inputs count as missing (flag 9): the outputs become null, never NaN.
  const finiteState = (x: StationWindowMean) =>
    Number.isFinite(x.tempC) && Number.isFinite(x.salinity) && Number.isFinite(x.depthM);
  const physOk = finiteState(up) && finiteState(down) && Number.isFinite(u) && Number.isFinite(rho);
  const physFlag = physOk ? worst(up.flag, down.flag, current.currentFlag) : 9;
  const o2Ok = Number.isFinite(up.o2UmolKg) && Number.isFinite(down.o2UmolKg);
  const o2Flag = o2Ok ? worst(physFlag, up.o2Flag, down.o2Flag) : 9;
  const pco2Flag = worst(physFlag, up.pco2Flag ?? up.flag, down.pco2Flag ?? down.flag);
  const pco2Present = Number.isFinite(up.pco2Uatm) && Number.isFinite(down.pco2Uatm);
  const pco2Mean = pco2Present ? 0.5 * ((up.pco2Uatm as number) + (down.pco2Uatm as number)) : undefined;

  // Air-sea exchange from transect means.
  if (current.windMS === undefined) notes.push('no_wind');
  if (current.baroHpa === undefined) notes.push('no_baro');
  const xco2 = current.xco2AirPpm ?? params.xco2AirPpm;
  if (current.xco2AirPpm === undefined) notes.push('xco2_configured');
  const as = airSeaFluxes({
    tempC: tMean,
    salinity: sMean,
    rhoKgM3: rho,
    o2UmolKg: up.o2UmolKg,
    o2DownUmolKg: down.o2UmolKg,
    o2Mean: params.airSeaO2Mean,
    residenceS: u !== 0 ? L / u : residenceS, // signed: reversed flow weights the other station
    depthM: h,
    ...(pco2Mean !== undefined && pco2Flag < 4 ? { pco2Uatm: pco2Mean } : {}),
    ...(current.windMS !== undefined ? { windMS: current.windMS } : {}),
    windHeightM: current.windHeightM ?? params.windHeightM,
    ...(current.baroHpa !== undefined ? { baroHpa: current.baroHpa } : {}),
    xco2AirPpm: xco2,
  });
  if (current.metFlag !== undefined) flag = worst(flag, current.metFlag >= 4 ? 3 : current.metFlag);
  // docs/methods/conventions.md 1.5: a defaulted barometer makes the dependent values (here the exchange terms) suspect.
  if (current.windMS !== undefined && current.baroHpa === undefined) flag = worst(flag, 3);

  // O2 budget -> NCP.
  const nx = options.next;
  const dtNextS = nx ? (nx.tCentreMs - current.tCentreMs) / 1000 : Number.NaN;
  const useNext = nx !== undefined && hasPrev && dtNextS > 0 && dtNextS <= params.maxPreviousGapMin * 60;
  const storage = o2Storage(
    { up, down },
    pU && pD ? { up: pU, down: pD } : undefined,
    dtS,
    useNext ? { pair: { up: nx.up, down: nx.down }, dtS: dtNextS } : undefined,
  );
  if (storage.form === 'centred') notes.push('storage_centred');
  const stO2 = storage.rate;
  const dO2 = down.o2UmolKg - up.o2UmolKg;
  const adO2 = advectionRate(u, up.o2UmolKg, down.o2UmolKg, L);
  let ncp: number | null = null;
  let sigmaNcp: number | null = null;
  let stFrac: number | null = null;
  // The O2-only part of sigma(NCP) that the inverse NEC inherits, split into what persists from window to
  // window (the optodes' inter-calibration, the exchange term) and what does not (the means' standard errors).
  let sigmaNcpO2Sys = 0;
  let sigmaNcpO2Rand = 0;
  if (o2Flag >= 4) {
    addReason(o2Flag === 9 ? 'input_missing' : 'input_qc_failed');
    flag = worst(flag, o2Flag);
  } else {
    ncp = benthicFluxUmolM2S(rho, h, stO2, adO2, as.fasO2UmolM2S);
    flag = worst(flag, o2Flag);
    if (hasPrev) {
      stFrac = storageFraction(stO2, adO2);
      // The steadiness test guards against the backward difference's error (storage.ts); a centred storage
      // term is second-order accurate where the concentration turns, and its window is not judged by it
      // (docs/methods/metabolism.md 6.6).
      if (stFrac > params.maxStorageFraction && storage.form !== 'centred') addReason('storage_dominates');
    }
    if (wantSigma) {
      const sigmaSt = storage.sigma;
      const sigmaDeq = 0.5 * Math.hypot(sigO2(up), sigO2(down));
      const sigmaFas = Math.hypot(as.fasO2UmolM2S * params.sigmaKRel, as.kO2MS * rho * sigmaDeq);
      // docs/methods/uncertainty.md 9.2: the station difference has the sensors' inter-calibration and the
      // random standard errors of the two window means.
      const semDC = Math.hypot(up.semO2UmolKg ?? 0, down.semO2UmolKg ?? 0);
      const base = {
        rhoKgM3: rho,
        depthM: h,
        uMS: u,
        lengthM: L,
        dC: dO2,
        storage: stO2,
        advection: adO2,
        sigmaStorage: sigmaSt,
        sigmaDC: Math.hypot(sigO2(up), sigO2(down), semDC),
        sigmaAirSeaUmolM2S: sigmaFas,
      };
      sigmaNcp = fluxSigmaUmolM2S({
        ...base,
        sigmaUMS: sigmaU,
        sigmaLengthM: params.sigmaLengthM,
        sigmaDepthM: sigmaH,
      });
      const o2Only = { ...base, sigmaUMS: 0, sigmaLengthM: 0, sigmaDepthM: 0 };
      sigmaNcpO2Sys = fluxSigmaUmolM2S({
        ...o2Only,
        sigmaStorage: 0,
        sigmaDC: Math.hypot(sigO2(up), sigO2(down)),
      });
      sigmaNcpO2Rand = fluxSigmaUmolM2S({ ...o2Only, sigmaDC: semDC, sigmaAirSeaUmolM2S: 0 });
    }
  }
  if (physFlag >= 4) addReason(physFlag === 9 ? 'input_missing' : 'input_qc_failed');
  flag = worst(flag, physFlag);

  // NEC and NCP_C.
  let nec: number | null = null;
  let sigmaNec: number | null = null;
  let necMethod: FluxResult['necMethod'] = null;
  let ncpC: number | null = null;
  let inverseState: InverseState | null = null;
  let necInverse: number | null = null;
  let necFailure: FluxResult['necFailure'] = null;
  const s0 = sMean;
  const taFlag = worst(physFlag, up.taFlag, down.taFlag);
  if (hasGradientTa(up) && hasGradientTa(down) && taFlag < 4) {
    necMethod = 'ta';
    const ctx: BudgetContext = {
      rhoKgM3: rho,
      depthM: h,
      uMS: u,
      lengthM: L,
      s0,
      dtS,
      sigmaUMS: sigmaU,
      sigmaDepthM: sigmaH,
      sigmaLengthM: params.sigmaLengthM,
      ...(pU && pD ? { prevUp: pU, prevDown: pD } : {}),
    };
    const ta = taBudget(ctx, up, down, params.sigmaTaFromSalinityUmolKg);
    nec = ta.necUmolM2S;
    if (wantSigma) sigmaNec = ta.sigmaNecUmolM2S;
    flag = worst(flag, taFlag);
    const dicFlag = worst(physFlag, up.dicFlag, down.dicFlag);
    if (up.dicUmolKg !== undefined && down.dicUmolKg !== undefined && dicFlag < 4) {
      ncpC = ncpCFromDic(ctx, up, down, ta, as.fasCo2UmolM2S ?? 0);
    }
  }
  // The inverse: NEC where no TA gradient is measured; in bottle windows (NEC from TA) it runs too when asked,
  // so the next window continues the storage form from this one instead of restarting from the steady form
  // (docs/methods/metabolism.md 6.5).
  const inverseApplies = pco2Present && ncp !== null;
  const runInverse = inverseApplies && (necMethod === null || (options.inverseWithTa ?? true));
  if (runInverse && necMethod === null) necMethod = 'inverse';
  if (runInverse && pco2Flag >= 4) {
    if (necMethod === 'inverse') addReason(pco2Flag === 9 ? 'input_missing' : 'input_qc_failed');
  } else if (runInverse) {
    const prevState = options.previousResult?.inverseState;
    const usePrev = hasPrev && prevState !== null && prevState !== undefined;
    const inv = inverseWindow(
      {
        up,
        down,
        tCentreMs: current.tCentreMs,
        uMS: u,
        depthM: h,
        rhoKgM3: rho,
        dtS,
        o2StorageUmolKgS: stO2,
        o2DiffUmolKg: dO2,
        airSea: as,
        baroHpa: current.baroHpa,
        previous: usePrev ? prevState : undefined,
        ...(wantSigma && necMethod === 'inverse'
          ? {
              sigmas: {
                uMS: sigmaU,
                depthM: sigmaH,
                ncpO2SysUmolM2S: sigmaNcpO2Sys,
                ncpO2RandUmolM2S: sigmaNcpO2Rand,
              },
            }
          : {}),
      },
      params,
    );
    if (inv.ok) inverseState = inv.state;
    if (necMethod === 'ta') {
      // Kept beside the TA budget's NEC for comparison; the window's flag and NEC are the TA budget's.
      if (inv.ok) necInverse = inv.necUmolM2S;
    } else {
      if (inv.steady) {
        notes.push('steady_form');
        flag = worst(flag, 3);
      }
      flag = worst(flag, pco2Flag, up.taSource === 'sample' ? undefined : up.taFlag);
      // docs/methods/metabolism.md 6.2: a configured site xCO2 instead of the met sensor's is flagged 2.
      if (current.xco2AirPpm === undefined && current.windMS !== undefined) flag = worst(flag, 2);
      if (inv.ok) {
        nec = inv.necUmolM2S;
        sigmaNec = inv.sigmaNecUmolM2S;
      } else {
        notes.push(inv.code === 'REEFD_METABOLISM_NEC_NO_ROOT' ? 'nec_no_root' : 'nec_carbonate_failed');
        necFailure = { code: inv.code, reason: inv.reason };
        flag = worst(flag, 4);
      }
    }
  }

  const valid = reasons.length === 0;
  if (!valid) flag = worst(flag, 3);
  const toMmol = (v: number | null) => (v === null ? null : v * UMOL_M2_S_TO_MMOL_M2_H);
  return {
    tCentreMs: current.tCentreMs,
    ncpMmolM2H: toMmol(ncp),
    sigmaNcpMmolM2H: toMmol(sigmaNcp),
    necMmolM2H: toMmol(nec),
    sigmaNecMmolM2H: toMmol(sigmaNec),
    necMethod,
    ncpCMmolM2H: toMmol(ncpC),
    uMS: u,
    sigmaUMS: sigmaU,
    depthM: h,
    sigmaDepthM: sigmaH,
    rhoKgM3: rho,
    residenceMin,
    angleOffDeg: angle,
    swapped,
    storageFractionO2: stFrac,
    valid,
    invalidReasons: reasons,
    flag,
    notes,
    airSea: {
      u10MS: as.u10MS,
      kO2MS: as.kO2MS,
      kCo2MS: as.kCo2MS,
      o2SatUmolKg: as.o2SatUmolKg,
      fasO2MmolM2H: as.fasO2UmolM2S * UMOL_M2_S_TO_MMOL_M2_H,
      fasCo2MmolM2H: toMmol(as.fasCo2UmolM2S),
      fco2AirUatm: as.fco2AirUatm,
    },
    necFailure,
    inverseState,
    necInverseMmolM2H: toMmol(necInverse),
  };
}
