// Depth-averaged current from one ADCP ensemble (reefd docs/methods/currents.md;
// docs/methods/uncertainty.md 9.2), in order: validate; attitude and tilt (5.2, 5.4); water depth (station
// pressure, else the head's own); side-lobe limit (5.3); bin QC and transforms (5.1, 5.4; bin-qc.ts); depth
// average (5.5); reef frame, speed, direction and bed stress (5.6); uncertainty (9.2).
//
// Flags (QARTOD; docs/methods/qc.md 7.4): the result takes the worst flag of the bins it uses (1 or 3),
// raised to 3 by its own checks (p_atm defaulted, station and ADCP depths differ by > 0.05 m, an
// ensemble shorter than 5 min). Failures return { ok: false } with a stable code (errors.ts).
import { qcBins, type BinPlan } from './bin-qc.js';
import { depthAverage2Into } from './depth-average.js';
import { currentFail } from './errors.js';
import { boundaryDistanceM, depthFromPressureM, sideLobeMaxRangeM } from './geometry.js';
import { bedStressPa, directionTowardsDeg, logLawCd, toReefFrame } from './reef-frame.js';
import { sensorPitchDeg, sensorRotationMatrix } from './sensor-attitude.js';
import { janusHead, totalTiltDeg } from './transforms.js';
import {
  DEFAULT_QC,
  type AdcpEnsemble,
  type AdcpQcThresholds,
  type AdcpSensorConfig,
  type CurrentContext,
  type CurrentFail,
  type CurrentResult,
} from './types.js';

const DEG = Math.PI / 180;
const PATM_DEFAULT_DBAR = 10.1325; // 1 atm (docs/methods/conventions.md 1.3)
const RHO_DEFAULT = 1025; // kg m-3, engineering default for reef seawater
const G_STANDARD = 9.80665; // m s-2, standard gravity
const CD_DEFAULT = 0.03; // docs/methods/currents.md 5.6
const DEPTH_MISMATCH_M = 0.05; // docs/methods/qc.md 7.2 (9): logger and ADCP depths
const MIN_ENSEMBLE_S = 300; // docs/methods/currents.md 5.5: orbital velocities cancel over >= 5 min
const REL_ERR = 0.01; // docs/methods/uncertainty.md 9.2: 1 % of reading
const BEAM_IDENTITY = [0, 1, 2, 3] as const;

function shapeOk(a: readonly (readonly unknown[])[] | undefined, n: number): boolean {
  if (a === undefined) return true;
  if (a.length !== n) return false;
  for (let i = 0; i < n; i++) if ((a[i] as readonly unknown[]).length !== 4) return false;
  return true;
}

/** The ensemble's shape and the sensor's configuration; a CurrentFail when either is unusable. */
function checkShapeAndConfig(ens: AdcpEnsemble, sensor: AdcpSensorConfig): CurrentFail | null {
  const nBins = ens.velMS.length;
  if (
    nBins === 0 ||
    !shapeOk(ens.velMS, nBins) ||
    !shapeOk(ens.corrPct, nBins) ||
    !shapeOk(ens.echo, nBins) ||
    !shapeOk(ens.pgPct, nBins) ||
    !(ens.binM > 0) ||
    !(ens.blankM >= 0)
  ) {
    return currentFail('REEFD_CURRENTS_SHAPE', `ensemble of ${nBins} bins has a malformed field`);
  }
  const zHeadM = sensor.heightM;
  const beamAngleDeg = sensor.beamAngleDeg ?? 20;
  const map = sensor.beamMap;
  const mapOk = map === undefined || [0, 1, 2, 3].every((k) => map.includes(k));
  if (!(zHeadM > 0) || !(beamAngleDeg > 0 && beamAngleDeg < 60) || !mapOk) {
    return currentFail(
      'REEFD_CURRENTS_CONFIG',
      `height_m ${zHeadM}, beam_angle_deg ${beamAngleDeg}, beam map ${String(map)}`,
    );
  }
  return null;
}

/** The result's running flag and notes (docs/methods/qc.md 7.4). */
interface EnsembleLog {
  flag: number;
  readonly notes: string[];
}

/** Attitude and tilt: the tilt flag, the cosine of the tilt and the instrument -> earth rotation. */
function attitude(ens: AdcpEnsemble, sensor: AdcpSensorConfig, qc: Readonly<AdcpQcThresholds>) {
  const { headingDeg, pitchDeg, rollDeg } = ens;
  const hasTilt = pitchDeg !== undefined && rollDeg !== undefined;
  if (ens.coord !== 'earth' && (headingDeg === undefined || !hasTilt)) {
    return currentFail('REEFD_CURRENTS_NO_ATTITUDE', `coord ${ens.coord} without heading, pitch and roll`);
  }
  let tiltFlag = 2;
  let cosTilt = 1;
  const rot = new Float64Array(9);
  if (hasTilt) {
    const p = sensorPitchDeg(sensor, pitchDeg, rollDeg);
    const tilt = totalTiltDeg(p, rollDeg);
    if (tilt > qc.tiltFailDeg) {
      return currentFail('REEFD_CURRENTS_TILT', `total tilt ${tilt.toFixed(1)} deg > ${qc.tiltFailDeg} deg`);
    }
    tiltFlag = tilt > qc.tiltSuspectDeg ? 3 : 1;
    cosTilt = Math.cos(p * DEG) * Math.cos(rollDeg * DEG);
    if (headingDeg !== undefined) sensorRotationMatrix(sensor, headingDeg, pitchDeg, rollDeg, rot);
  }
  return { tiltFlag, cosTilt, rot };
}

/** Water depth: the station's pressure sensor, else the ADCP's own pressure; and the ensemble's own checks. */
function waterDepth(ens: AdcpEnsemble, sensor: AdcpSensorConfig, ctx: CurrentContext, log: EnsembleLog) {
  const zHeadM = sensor.heightM;
  const rho = ctx.rhoKgM3 ?? RHO_DEFAULT;
  const g = ctx.gMS2 ?? G_STANDARD;
  let depthAdcpM = Number.NaN;
  if (ens.presDbar !== undefined && Number.isFinite(ens.presDbar)) {
    depthAdcpM = depthFromPressureM(ens.presDbar, ctx.patmDbar ?? PATM_DEFAULT_DBAR, rho, g, zHeadM);
  }
  let depthM: number;
  let depthSource: 'pressure' | 'adcp';
  if (ctx.depthM !== undefined && Number.isFinite(ctx.depthM)) {
    depthM = ctx.depthM;
    depthSource = 'pressure';
    if (Math.abs(depthAdcpM - depthM) > DEPTH_MISMATCH_M) {
      log.flag = 3;
      log.notes.push(`depth_mismatch: station ${depthM.toFixed(3)} m, adcp ${depthAdcpM.toFixed(3)} m`);
    }
  } else if (Number.isFinite(depthAdcpM)) {
    depthM = depthAdcpM;
    depthSource = 'adcp';
    if (ctx.patmDbar === undefined) {
      log.flag = 3;
      log.notes.push('patm_default: 10.1325 dbar assumed for the ADCP depth');
    }
  } else {
    return currentFail('REEFD_CURRENTS_NO_DEPTH', 'no station depth and no pres_dbar');
  }
  if (!(depthM > zHeadM)) {
    return currentFail('REEFD_CURRENTS_HEAD_DRY', `depth ${depthM.toFixed(3)} m, head at ${zHeadM} m`);
  }
  if (ens.durationS !== undefined && ens.durationS < MIN_ENSEMBLE_S) {
    log.flag = 3;
    log.notes.push(`short_ensemble: ${ens.durationS} s < ${MIN_ENSEMBLE_S} s`);
  }
  return { rho, depthM, depthSource };
}

/** Side-lobe limit and bins: the valid bins' heights and velocities, z ascending, and the bins' tally. */
function profileBins(
  ens: AdcpEnsemble,
  sensor: AdcpSensorConfig,
  ctx: CurrentContext,
  qc: Readonly<AdcpQcThresholds>,
  att: { tiltFlag: number; cosTilt: number; rot: Float64Array },
  depthM: number,
) {
  const nBins = ens.velMS.length;
  const zHeadM = sensor.heightM;
  const beamAngleDeg = sensor.beamAngleDeg ?? 20;
  const { cosTilt } = att;
  const boundaryM = boundaryDistanceM(sensor.orientation, zHeadM, depthM, ctx.hm0SsM);
  const plan: BinPlan = {
    ens,
    head: janusHead(beamAngleDeg, sensor.convex ?? true),
    rot: att.rot,
    qc,
    r1M: sensor.firstBinRangeM ?? ens.blankM + 0.5 * ens.binM,
    binM: ens.binM,
    rMaxM: sideLobeMaxRangeM(boundaryM, beamAngleDeg),
    zHeadM,
    dzdr: sensor.orientation === 'up' ? cosTilt : -cosTilt,
    depthM,
    tiltFlag: att.tiltFlag,
    beamMap: sensor.beamMap ?? BEAM_IDENTITY,
    beamSign: sensor.beamSign ?? 1,
  };
  const binFlags = new Array<number>(nBins);
  const z = new Float64Array(nBins);
  const east = new Float64Array(nBins);
  const north = new Float64Array(nBins);
  const tally = qcBins(plan, binFlags, z, east, north);
  const m = tally.valid;
  if (sensor.orientation === 'down') {
    // bins run away from the head, i.e. downwards: the average wants z ascending
    z.subarray(0, m).reverse();
    east.subarray(0, m).reverse();
    north.subarray(0, m).reverse();
  }
  return { binFlags, z, east, north, tally, m };
}

/**
 * Coverage: the part of the column the profile pins down. Up-looking: from the bed (the power law from
 * the no-slip bottom through the first bin is a constrained extrapolation, docs/methods/currents.md 5.5) to the top of
 * the highest valid cell; down-looking: from the bottom of the lowest valid cell to the surface. Counting
 * only the cells themselves would fail every shallow reef-flat ADCP: head height and blanking alone are
 * ~25 % of a 1.5 m flat, and the wave troughs take the top (5.3).
 */
function coverageFraction(
  sensor: AdcpSensorConfig,
  binM: number,
  cosTilt: number,
  z: Float64Array,
  m: number,
  depthM: number,
): number {
  const halfCellM = 0.5 * binM * cosTilt;
  return m === 0
    ? 0
    : sensor.orientation === 'down'
      ? (depthM - ((z[0] as number) - halfCellM)) / depthM
      : ((z[m - 1] as number) + halfCellM) / depthM;
}

/**
 * Uncertainty (docs/methods/uncertainty.md 9.2). Random term: sigma_ping^2/N_pings when configured; else the mean
 * square error velocity, which by construction of d has the noise variance of a horizontal component
 * (conservative: it also holds any inhomogeneity of the flow).
 */
function sigmaCurrentMS(
  mean: Float64Array,
  speedMS: number,
  sensor: AdcpSensorConfig,
  errMeanSq: number,
  notes: string[],
): number {
  const dE = 0.5 * ((mean[1] as number) - (mean[0] as number));
  const dN = 0.5 * ((mean[3] as number) - (mean[2] as number));
  const sigmaHeadingRad = (sensor.headingSigmaDeg ?? 2) * DEG;
  let var2 = (REL_ERR * speedMS) ** 2 + (speedMS * sigmaHeadingRad) ** 2 + dE * dE + dN * dN;
  if (sensor.pingSigmaMS !== undefined && sensor.pingsPerEnsemble !== undefined) {
    var2 += (sensor.pingSigmaMS * sensor.pingSigmaMS) / sensor.pingsPerEnsemble;
  } else if (Number.isFinite(errMeanSq)) {
    var2 += errMeanSq;
  } else {
    notes.push('sigma_without_noise: no ping noise configured and no error velocity');
  }
  return Math.sqrt(var2);
}

/**
 * Depth-averaged current of one ensemble. Units: m, m/s, deg, dbar, Pa (see types.ts).
 * Valid for shallow moorings (h up to a few tens of m) and total tilt below 20 deg.
 */
export function processEnsemble(
  ens: AdcpEnsemble,
  sensor: AdcpSensorConfig,
  ctx: CurrentContext,
): CurrentResult {
  const bad = checkShapeAndConfig(ens, sensor);
  if (bad !== null) return bad;
  const qc: Readonly<AdcpQcThresholds> =
    sensor.qc === undefined ? DEFAULT_QC : { ...DEFAULT_QC, ...sensor.qc };
  const log: EnsembleLog = { flag: 1, notes: [] };
  const notes = log.notes;

  const att = attitude(ens, sensor, qc);
  if ('ok' in att) return att;
  const water = waterDepth(ens, sensor, ctx, log);
  if ('ok' in water) return water;
  const { rho, depthM, depthSource } = water;

  const { binFlags, z, east, north, tally, m } = profileBins(ens, sensor, ctx, qc, att, depthM);
  const coverage = coverageFraction(sensor, ens.binM, att.cosTilt, z, m, depthM);
  if (m < qc.minBins || coverage < qc.minCoverage) {
    return currentFail(
      'REEFD_CURRENTS_TOO_FEW_BINS',
      `${m} valid bins reach ${(100 * Math.min(coverage, 1)).toFixed(0)} % of the ${depthM.toFixed(2)} m column`,
    );
  }
  if (tally.threeBeam > 0) notes.push(`three_beam: ${tally.threeBeam} bins`);
  if (tally.worst > log.flag) log.flag = tally.worst;

  // Depth average: [E const, E power, N const, N power].
  const mean = new Float64Array(4);
  depthAverage2Into(z, east, north, m, depthM, sensor.bedPowerM ?? 6, mean);
  const power = sensor.topExtrapolation === 'power';
  const eastMS = (power ? mean[1] : mean[0]) as number;
  const northMS = (power ? mean[3] : mean[2]) as number;
  const speedMS = Math.sqrt(eastMS * eastMS + northMS * northMS);
  const { uMS, vMS } = toReefFrame(eastMS, northMS, ctx.reefAxisDeg);
  const sigmaMS = sigmaCurrentMS(mean, speedMS, sensor, tally.errMeanSq, notes);

  const cd = ctx.z0M !== undefined ? logLawCd(depthM, ctx.z0M) : (ctx.cd ?? CD_DEFAULT);
  return {
    ok: true,
    flag: log.flag,
    eastMS,
    northMS,
    uMS,
    vMS,
    speedMS,
    dirToDeg: directionTowardsDeg(eastMS, northMS),
    binsUsed: m,
    depthM,
    depthSource,
    tauBedPa: bedStressPa(speedMS, rho, cd),
    sigmaMS,
    binFlags,
    notes,
  };
}
