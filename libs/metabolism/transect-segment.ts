// The control volume of one transect window (docs/methods/metabolism.md 6.1): which station is upstream, the
// segment's mean velocity, depth and density, the preceding window used for storage, and the record of what the
// window's checks found (invalid reasons, notes, the worst flag) shared by the budget steps of transect-flux.ts.

import { densityKgM3 } from './chem.js';
import { alongBearingMS, angleOffBearingDeg, defaultCurrentSigmaMS } from './geometry.js';
import type { InvalidReason, QcFlag, StationWindowMean, TransectParams, TransectWindow } from './types.js';

export const worst = (...flags: (QcFlag | undefined)[]): QcFlag => {
  let w: QcFlag = 1;
  for (const f of flags) if (f !== undefined && f > w) w = f;
  return w;
};

/** What a window's checks found, in the order found: the reasons it is invalid, notes and the worst flag. */
export interface WindowLog {
  reasons: InvalidReason[];
  notes: string[];
  flag: QcFlag;
}

export function addReason(log: WindowLog, r: InvalidReason): void {
  if (!log.reasons.includes(r)) log.reasons.push(r);
}

// Typical accuracies (docs/methods/uncertainty.md 9.3) used when a station mean carries no sigma.
export const sigO2 = (s: StationWindowMean) => s.sigmaO2UmolKg ?? 0.02 * s.o2UmolKg;
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

/** The oriented segment of one window: stations in flow order, mean velocity, depth, density and storage pair. */
export interface Segment {
  current: TransectWindow;
  params: TransectParams;
  up: StationWindowMean;
  down: StationWindowMean;
  /** The preceding window's stations in the same flow order, when it is near enough for storage. */
  pU: StationWindowMean | undefined;
  pD: StationWindowMean | undefined;
  hasPrev: boolean;
  dtS: number;
  /** Segment-mean velocity along the bearing [m/s] and its sigma. */
  u: number;
  sigmaU: number;
  angle: number;
  swapped: boolean;
  h: number;
  sigmaH: number;
  residenceS: number;
  residenceMin: number | null;
  rho: number;
  tMean: number;
  sMean: number;
}

/** Which station is upstream: reverse flow swaps the stations' roles (and the preceding window's) or invalidates. */
function flowOrder(
  current: TransectWindow,
  previous: TransectWindow | undefined,
  params: TransectParams,
  log: WindowLog,
) {
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
      addReason(log, 'reverse_flow');
    }
  }
  return { u, angle, up, down, prevUp, prevDown, swapped };
}

/** The validity checks of the segment's geometry (docs/methods/metabolism.md 6.6), and its residence time. */
function checkGeometry(
  u: number,
  angle: number,
  up: StationWindowMean,
  down: StationWindowMean,
  params: TransectParams,
  log: WindowLog,
) {
  if (Math.abs(u) < params.minSpeedMS) addReason(log, 'speed_below_min');
  if (angle > params.maxAngleDeg && !log.reasons.includes('reverse_flow')) {
    addReason(log, 'angle_off_transect');
    log.flag = worst(log.flag, angle <= params.suspectAngleDeg ? 3 : 4);
  }
  if (Math.min(up.depthM, down.depthM) < params.minDepthM) addReason(log, 'depth_below_min');
  const residenceS = u !== 0 ? params.lengthM / Math.abs(u) : Number.POSITIVE_INFINITY;
  const residenceMin = Number.isFinite(residenceS) ? residenceS / 60 : null;
  if (residenceS / 60 > params.maxResidenceMin) addReason(log, 'residence_above_max');
  return { residenceS, residenceMin };
}

/** The preceding window's stations for the storage term, when it is near enough (else none, noted). */
function storagePair(
  current: TransectWindow,
  previous: TransectWindow | undefined,
  prevUp: StationWindowMean | undefined,
  prevDown: StationWindowMean | undefined,
  params: TransectParams,
  log: WindowLog,
) {
  const dtS = previous ? (current.tCentreMs - previous.tCentreMs) / 1000 : Number.NaN;
  const hasPrev =
    prevUp !== undefined && prevDown !== undefined && dtS > 0 && dtS <= params.maxPreviousGapMin * 60;
  if (!hasPrev) log.notes.push('no_storage');
  const pU: StationWindowMean | undefined = hasPrev ? prevUp : undefined;
  const pD: StationWindowMean | undefined = hasPrev ? prevDown : undefined;
  return { dtS, hasPrev, pU, pD };
}

/** Orients the window, scales the velocity to the segment mean and runs the geometric validity checks. */
export function orientSegment(
  current: TransectWindow,
  previous: TransectWindow | undefined,
  params: TransectParams,
  log: WindowLog,
): Segment {
  const {
    angle,
    up,
    down,
    prevUp,
    prevDown,
    swapped,
    u: uCurrent,
  } = flowOrder(current, previous, params, log);
  const h = 0.5 * (up.depthM + down.depthM);
  const sigmaH = 0.5 * Math.hypot(sigDepth(up), sigDepth(down));
  // Continuity (docs/methods/metabolism.md 6.1): the segment carries the volume flux per metre measured at the
  // current station, q = U_c h_c, so its mean velocity over the mean depth h is U = q / h.
  const toMean = transportScale(current.currentDepthM, h);
  const sigmaU = (current.sigmaUMS ?? defaultCurrentSigmaMS(uCurrent)) * toMean;
  const u = uCurrent * toMean;
  log.flag = worst(up.flag, down.flag, current.currentFlag);
  const residence = checkGeometry(u, angle, up, down, params, log);

  const rho = 0.5 * (densityKgM3(up.salinity, up.tempC) + densityKgM3(down.salinity, down.tempC));
  const tMean = 0.5 * (up.tempC + down.tempC);
  const sMean = 0.5 * (up.salinity + down.salinity);
  const pair = storagePair(current, previous, prevUp, prevDown, params, log);
  return {
    current,
    params,
    up,
    down,
    u,
    sigmaU,
    angle,
    swapped,
    h,
    sigmaH,
    rho,
    tMean,
    sMean,
    ...residence,
    ...pair,
  };
}
