// Input and output shapes of the currents library. AdcpEnsemble mirrors the contract's `adcp`
// message (docs/contract-v1.md section 1) in camelCase; CurrentResult carries the `current` record's values
// (docs/contract-v1.md section 4) plus the diagnostics the processor needs.

/** One ADCP ensemble, as the `adcp` message carries it. Bins are ordered away from the head. */
export interface AdcpEnsemble {
  /** `beam` (b1..b4), `inst` (x, y, z, error) or `earth` (east, north, up, error) */
  readonly coord: 'beam' | 'inst' | 'earth';
  /** blank, m, to the leading edge of cell 1 (along the head's axis) */
  readonly blankM: number;
  /** cell size along the head's axis, m */
  readonly binM: number;
  /** bins x 4 velocities, m/s; null marks a bad value */
  readonly velMS: readonly (readonly (number | null)[])[];
  /** compass heading, deg (required for beam and inst) */
  readonly headingDeg?: number;
  readonly pitchDeg?: number;
  readonly rollDeg?: number;
  /** bins x 4 correlation, % */
  readonly corrPct?: readonly (readonly number[])[];
  /** bins x 4 echo intensity, counts */
  readonly echo?: readonly (readonly number[])[];
  /** bins x 4 percent good, % (an extension of the contract message; per beam in beam coordinates) */
  readonly pgPct?: readonly (readonly number[])[];
  /** absolute pressure at the head, dbar */
  readonly presDbar?: number;
  readonly tempC?: number;
  /** averaging span of the ensemble, s (extension; < 300 s is flag 3: orbital velocities may not cancel) */
  readonly durationS?: number;
}

/** Bin QC thresholds (docs/methods/currents.md 5.4; engineering defaults, tune per instrument). */
export interface AdcpQcThresholds {
  /** fail a beam below this correlation, % */
  readonly corrMinPct: number;
  /** the surface (bed) echo peak must rise this far above the lowest echo before it, counts */
  readonly echoPeakRiseCounts: number;
  /** flag 3 if one beam exceeds the four-beam median by more than this, counts */
  readonly echoOutlierCounts: number;
  /** fail a beam below this percent good, % */
  readonly pgMinPct: number;
  /** |error velocity| suspect / fail, m/s */
  readonly errSuspectMS: number;
  readonly errFailMS: number;
  /** |vertical velocity| suspect, m/s */
  readonly wSuspectMS: number;
  /** horizontal speed suspect / fail, m/s */
  readonly speedSuspectMS: number;
  readonly speedFailMS: number;
  /** total tilt suspect / fail, deg */
  readonly tiltSuspectDeg: number;
  readonly tiltFailDeg: number;
  /** depth average: minimum valid bins and minimum fraction of h they cover */
  readonly minBins: number;
  readonly minCoverage: number;
}

export const DEFAULT_QC: Readonly<AdcpQcThresholds> = Object.freeze({
  corrMinPct: 50,
  echoPeakRiseCounts: 20,
  echoOutlierCounts: 30,
  pgMinPct: 25,
  errSuspectMS: 0.05,
  errFailMS: 0.15,
  wSuspectMS: 0.1,
  speedSuspectMS: 1.5,
  speedFailMS: 3,
  tiltSuspectDeg: 10,
  tiltFailDeg: 20,
  minBins: 2,
  minCoverage: 0.4,
});

/** One ADCP's configuration (the contract's `adcp` sensor entry plus processing options). */
export interface AdcpSensorConfig {
  /** height of the transducer face above the bed, m */
  readonly heightM: number;
  /** beam angle from the head's axis, deg (default 20) */
  readonly beamAngleDeg?: number;
  readonly orientation: 'up' | 'down';
  /** magnetic declination, deg, east positive (default 0) */
  readonly declinationDeg?: number;
  /** alignment offset added to the heading, deg (default 0) */
  readonly headingOffsetDeg?: number;
  /** convex head (default true) */
  readonly convex?: boolean;
  /**
   * Beam coordinates only: beamMap[k] is the index (0-3) in the message of this project's beam k + 1
   * (default [0, 1, 2, 3]), and beamSign is -1 for instruments whose beam velocities are positive
   * towards the head (default +1). Prove the mapping with a known-flow test (docs/methods/currents.md 5.1).
   */
  readonly beamMap?: readonly [number, number, number, number];
  readonly beamSign?: 1 | -1;
  /** range of the centre of cell 1, m; default blank + bin/2 */
  readonly firstBinRangeM?: number;
  /** tilt sensor reports independent axis tilts: apply the gimbal pitch correction (default false) */
  readonly independentTilt?: boolean;
  /** near-bed power-law exponent m, u ~ z^(1/m) (default 6; 7 is the usual alternative) */
  readonly bedPowerM?: number;
  /** top extrapolation from the highest valid bin to the surface (default 'constant') */
  readonly topExtrapolation?: 'constant' | 'power';
  /** single-ping horizontal standard deviation, m/s, and pings per ensemble (for sigma) */
  readonly pingSigmaMS?: number;
  readonly pingsPerEnsemble?: number;
  /** heading uncertainty, deg (default 2) */
  readonly headingSigmaDeg?: number;
  readonly qc?: Partial<AdcpQcThresholds>;
}

/** Station context for one ensemble. */
export interface CurrentContext {
  /** mean water depth h, m, from the station's pressure sensor (preferred over the ADCP's own) */
  readonly depthM?: number;
  /** sea-swell significant height, m: the side-lobe limit is taken at the troughs */
  readonly hm0SsM?: number;
  /** atmospheric pressure, dbar (default 10.1325 dbar = 1 atm, flag 3) */
  readonly patmDbar?: number;
  /** seawater density, kg m-3 (default 1025) */
  readonly rhoKgM3?: number;
  /** gravity, m s-2 (default 9.80665) */
  readonly gMS2?: number;
  /** shoreward cross-reef bearing (towards), deg true */
  readonly reefAxisDeg: number;
  /** quadratic drag coefficient (default 0.03) */
  readonly cd?: number;
  /** bed roughness length, m: when given, Cd = [kappa/(ln(h/z0) - 1)]^2 replaces cd */
  readonly z0M?: number;
}

export interface CurrentOk {
  readonly ok: true;
  /** QARTOD flag of the depth-averaged value: 1 pass, 3 suspect */
  readonly flag: number;
  /** depth-averaged velocity, m/s */
  readonly eastMS: number;
  readonly northMS: number;
  /** cross-reef (along reef_axis_deg) and along-reef (90 deg counter-clockwise from u) */
  readonly uMS: number;
  readonly vMS: number;
  readonly speedMS: number;
  /** direction towards, deg true, [0, 360) */
  readonly dirToDeg: number;
  readonly binsUsed: number;
  /** water depth used, m */
  readonly depthM: number;
  readonly depthSource: 'pressure' | 'adcp';
  /** bed shear stress magnitude rho Cd |U|^2, Pa (direction that of U) */
  readonly tauBedPa: number;
  /** standard uncertainty of the depth-averaged speed, m/s (docs/methods/uncertainty.md 9.2) */
  readonly sigmaMS: number;
  /** QARTOD flag per bin, in range order */
  readonly binFlags: number[];
  readonly notes: string[];
}

export interface CurrentFail {
  readonly ok: false;
  readonly flag: number;
  /** stable error code, REEFD_CURRENTS_* */
  readonly code: string;
  /** short machine reason, e.g. `tilt` */
  readonly reason: string;
  /** what is wrong and how to fix it */
  readonly message: string;
}

export type CurrentResult = CurrentOk | CurrentFail;
