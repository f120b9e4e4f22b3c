// Data shapes of the transect flux computation (docs/contract-v1.md `flux` record and `transects` config).

import { MetabolismError } from './errors.js';

/** QARTOD flag: 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing. */
export type QcFlag = 1 | 2 | 3 | 4 | 9;

export type TaSource = 'measured' | 'sample' | 'salinity';

/**
 * Block means of one station over a window (docs/methods/conventions.md 1.5, time base). sigma* are the uncertainties that matter
 * for station differences (inter-calibration; default: the typical accuracy of docs/methods/uncertainty.md 9.3); sem* are the
 * random standard errors of the window means (they drive the storage sigma, docs/methods/uncertainty.md 9.2; default 0).
 */
export interface StationWindowMean {
  tempC: number;
  salinity: number;
  o2UmolKg: number;
  pco2Uatm?: number;
  taUmolKg?: number;
  /** Where TA comes from; 'salinity' carries no biological gradient and never feeds the TA budget. */
  taSource?: TaSource;
  dicUmolKg?: number;
  /** Mean water depth at the station [m]. */
  depthM: number;
  /** Worst flag of the physical state (t, S, depth; a dry station is 4). */
  flag: QcFlag;
  o2Flag?: QcFlag;
  pco2Flag?: QcFlag;
  taFlag?: QcFlag;
  dicFlag?: QcFlag;
  sigmaTempC?: number;
  sigmaSalinity?: number;
  sigmaO2UmolKg?: number;
  sigmaPco2Uatm?: number;
  sigmaTaUmolKg?: number;
  sigmaDicUmolKg?: number;
  sigmaDepthM?: number;
  semO2UmolKg?: number;
  semPco2Uatm?: number;
  semTaUmolKg?: number;
  semDicUmolKg?: number;
}

/** One budget window of a transect: station means, the depth-averaged current and the weather. */
export interface TransectWindow {
  /** Window centre, epoch ms (event time). */
  tCentreMs: number;
  up: StationWindowMean;
  down: StationWindowMean;
  /** Depth-averaged current at the transect's `current` station, earth frame [m/s]. */
  eastMS: number;
  northMS: number;
  /** sigma of the along-transect velocity [m/s]; default from docs/methods/uncertainty.md 9.3 (see defaultCurrentSigmaMS). */
  sigmaUMS?: number;
  currentFlag?: QcFlag;
  /**
   * Mean water depth at the `current` station over the window [m]: the segment's transport is U_c h_c
   * (continuity, docs/methods/metabolism.md 6.1). Without it the current station's velocity is taken as the
   * segment's mean velocity.
   */
  currentDepthM?: number;
  /** Wind speed [m/s] at windHeightM (default TransectParams.windHeightM). */
  windMS?: number;
  windHeightM?: number;
  baroHpa?: number;
  /** Atmospheric dry-air xCO2 from the met sensor [umol/mol]; else TransectParams.xco2AirPpm (flag 2). */
  xco2AirPpm?: number;
  metFlag?: QcFlag;
}

export interface TransectParams {
  lengthM: number;
  /** Direction from upstream to downstream, degrees true (default reef_axis_deg). */
  bearingDeg: number;
  /** Photosynthetic quotient, mol O2 per mol C (default 1.0). */
  pq: number;
  windowMin: number;
  minSpeedMS: number;
  /** Flow more than this off the bearing is invalid (flag 3 up to suspectAngleDeg, 4 beyond). */
  maxAngleDeg: number;
  suspectAngleDeg: number;
  maxResidenceMin: number;
  maxStorageFraction: number;
  minDepthM: number;
  /** Reverse flow: swap the station roles (true) or flag the window invalid (false). */
  swapOnReverse: boolean;
  /** A previous window further back than this gives no storage term [min]. */
  maxPreviousGapMin: number;
  /** Configured atmospheric xCO2 when the met sensor has none [umol/mol]. */
  xco2AirPpm: number;
  /** Anemometer height above the sea surface [m]. */
  windHeightM: number;
  /** Fallback upstream TA for the inverse: TA = taS35UmolKg S/35 (contract `alkalinity.ta_s35_umol_kg`). */
  taS35UmolKg: number;
  sigmaLengthM: number;
  /** sigma of the TA from salinity [umol/kg] (docs/methods/uncertainty.md 9.3: site regression residual). */
  sigmaTaFromSalinityUmolKg: number;
  /** Relative sigma of the transfer velocity (docs/methods/uncertainty.md 9.2). */
  sigmaKRel: number;
  sigmaPq: number;
  /** Transect-mean O2 for the exchange term: exact steady path mean (default) or station mean (air-sea.ts). */
  airSeaO2Mean: 'exponential' | 'trapezoid';
  necBracketMmolM2H: number;
  necMaxDoublings: number;
  necTolMmolM2H: number;
}

/** Engineering defaults (docs/methods/metabolism.md 6.5-6.6; docs/methods/uncertainty.md 9.2); one place. */
export const DEFAULT_TRANSECT_PARAMS: Readonly<Omit<TransectParams, 'lengthM' | 'bearingDeg'>> =
  Object.freeze({
    pq: 1.0,
    windowMin: 30,
    minSpeedMS: 0.02,
    maxAngleDeg: 30,
    suspectAngleDeg: 45,
    maxResidenceMin: 240,
    maxStorageFraction: 0.5,
    minDepthM: 0.2,
    swapOnReverse: false,
    maxPreviousGapMin: 60,
    xco2AirPpm: 420,
    windHeightM: 10,
    taS35UmolKg: 2300,
    sigmaLengthM: 0,
    sigmaTaFromSalinityUmolKg: 10,
    sigmaKRel: 0.2,
    sigmaPq: 0,
    airSeaO2Mean: 'exponential',
    necBracketMmolM2H: 100,
    necMaxDoublings: 3,
    necTolMmolM2H: 1e-4,
  });

export type TransectParamsInput = Pick<TransectParams, 'lengthM' | 'bearingDeg'> &
  Partial<Omit<TransectParams, 'lengthM' | 'bearingDeg'>>;

/**
 * Full, frozen parameters from the configured ones plus the defaults. Throws MetabolismError
 * REEFD_METABOLISM_BAD_PARAMS (at start-up, never per window) for a value out of range.
 */
export function makeTransectParams(p: TransectParamsInput): Readonly<TransectParams> {
  const r: TransectParams = { ...DEFAULT_TRANSECT_PARAMS, ...p };
  const positive = ['lengthM', 'pq', 'windowMin', 'maxResidenceMin', 'windHeightM', 'taS35UmolKg'] as const;
  for (const k of positive) {
    if (!(r[k] > 0) || !Number.isFinite(r[k]))
      throw new MetabolismError('REEFD_METABOLISM_BAD_PARAMS', `${k} = ${r[k]} must be > 0`);
  }
  if (!Number.isFinite(r.bearingDeg)) {
    throw new MetabolismError(
      'REEFD_METABOLISM_BAD_PARAMS',
      `bearingDeg = ${r.bearingDeg} must be a finite bearing`,
    );
  }
  if (!(r.maxAngleDeg > 0 && r.maxAngleDeg <= r.suspectAngleDeg && r.suspectAngleDeg <= 90)) {
    throw new MetabolismError(
      'REEFD_METABOLISM_BAD_PARAMS',
      `maxAngleDeg ${r.maxAngleDeg} and suspectAngleDeg ${r.suspectAngleDeg} need 0 < max <= suspect <= 90`,
    );
  }
  if (!(r.necBracketMmolM2H > 0 && r.necTolMmolM2H > 0 && r.necMaxDoublings >= 0)) {
    throw new MetabolismError('REEFD_METABOLISM_BAD_PARAMS', 'the NEC bracket and tolerance must be > 0');
  }
  return Object.freeze(r);
}

export type InvalidReason =
  | 'speed_below_min'
  | 'reverse_flow'
  | 'angle_off_transect'
  | 'residence_above_max'
  | 'depth_below_min'
  | 'storage_dominates'
  | 'input_qc_failed'
  | 'input_missing';

export interface AirSeaTerms {
  u10MS: number;
  kO2MS: number;
  kCo2MS: number;
  o2SatUmolKg: number;
  /** Water-to-air fluxes, mmol m-2 h-1 (positive = outgassing). */
  fasO2MmolM2H: number;
  fasCo2MmolM2H: number | null;
  fco2AirUatm: number | null;
}

/** Downstream carbonate state the inverse found; the next window's storage form starts from it. */
export interface InverseState {
  tCentreMs: number;
  upTaUmolKg: number;
  upDicUmolKg: number;
  upSalinity: number;
  downTaUmolKg: number;
  downDicUmolKg: number;
  downSalinity: number;
}

export interface FluxResult {
  tCentreMs: number;
  ncpMmolM2H: number | null;
  sigmaNcpMmolM2H: number | null;
  necMmolM2H: number | null;
  sigmaNecMmolM2H: number | null;
  necMethod: 'ta' | 'inverse' | null;
  /** Organic carbon production from DIC when DIC and TA are measured at both stations (docs/methods/metabolism.md 6.3). */
  ncpCMmolM2H: number | null;
  uMS: number;
  sigmaUMS: number;
  depthM: number;
  sigmaDepthM: number;
  rhoKgM3: number;
  residenceMin: number | null;
  angleOffDeg: number;
  /** True when the flow was reversed and the station roles were swapped. */
  swapped: boolean;
  storageFractionO2: number | null;
  valid: boolean;
  invalidReasons: InvalidReason[];
  flag: QcFlag;
  /** Informational notes (e.g. 'no_wind', 'steady_form', 'nec_no_root'). */
  notes: string[];
  airSea: AirSeaTerms | null;
  /** Why NEC is null although a method applied (stable code and reason), else null. */
  necFailure: { code: string; reason: string } | null;
  inverseState: InverseState | null;
  /**
   * In a window whose NEC comes from the TA budget, the NEC the pCO2 + O2 inverse gives for it (run there to
   * keep its chain of states, docs/methods/metabolism.md 6.5), for comparison; null elsewhere.
   */
  necInverseMmolM2H: number | null;
}
