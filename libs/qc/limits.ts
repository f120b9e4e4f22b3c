// Starting QC thresholds for a reef flat: docs/methods/qc.md 7.3 (engineering defaults, not published values), in the
// style of the U.S. IOOS QARTOD manuals (7.1). Tune per site and instrument; every value here can be overridden
// through createQcState().

const HOUR_MS = 3_600_000;

/** Lower/upper bound; a missing side is not tested. */
export interface Bounds {
  readonly min?: number;
  readonly max?: number;
}

export interface SpikeLimits {
  /** |V_n - (V_{n-1} + V_{n+1})/2| above this gives 3 (variable's unit). */
  readonly suspect: number;
  /** ... above this gives 4. */
  readonly fail: number;
}

export interface RateOfChangeLimits {
  /** |V_n - V_{n-1}| above nSd x sd gives 3. QARTOD default 3 (docs/methods/qc.md 7.2). */
  readonly nSd: number;
  /** Span of the sd, ms (docs/methods/qc.md 7.2: the previous 25 h). */
  readonly windowMs: number;
  /** Fewest samples in the window before the test is evaluated. */
  readonly minSamples: number;
  /** Floor on sd (variable's unit) so a quiet period does not turn resolution steps into suspects. */
  readonly minSd: number;
}

export interface FlatLineLimits {
  /** Values within eps of V_n count as unchanged (variable's unit). */
  readonly eps: number;
  /** All values over the last suspectMs within eps gives 3. */
  readonly suspectMs: number;
  /** ... over the last failMs gives 4. */
  readonly failMs: number;
}

export interface AttenuatedLimits {
  /** Window, ms. */
  readonly windowMs: number;
  /** Measure of variation over the window. */
  readonly measure: 'sd' | 'range';
  /** Below this gives 3 (variable's unit). */
  readonly suspectBelow: number;
  /** Below this gives 4; omit for suspect only. */
  readonly failBelow?: number;
  /** Fewest samples in the window before the test is evaluated. */
  readonly minSamples: number;
}

/** Per-station monthly envelope (docs/methods/qc.md 7.2 test 4). */
export interface ClimatologyTable {
  /** 12 entries, January first (UTC month); null = no envelope for that month (test not evaluated). */
  readonly monthly: ReadonlyArray<Bounds | null>;
  /** Years of data behind the table; below 1 the test is not evaluated (docs/methods/qc.md 7.2). */
  readonly years: number;
}

export interface QcLimits {
  /** Outside gives 4 (physically impossible or beyond the sensor's range). */
  readonly sensor: Bounds;
  /** Outside gives 3 (site expectation). */
  readonly user: Bounds;
  readonly spike?: SpikeLimits;
  readonly rateOfChange?: RateOfChangeLimits;
  readonly flatLine?: FlatLineLimits;
  readonly attenuated?: AttenuatedLimits;
  readonly climatology?: ClimatologyTable;
  /** Neighbours further apart than this are not used by the spike and rate-of-change tests, ms. */
  readonly maxGapMs: number;
}

const roc = (minSd: number): RateOfChangeLimits => ({
  nSd: 3,
  windowMs: 25 * HOUR_MS,
  minSamples: 24,
  minSd,
});
const flat = (eps: number, sH: number, fH: number): FlatLineLimits => ({
  eps,
  suspectMs: sH * HOUR_MS,
  failMs: fH * HOUR_MS,
});
const GAP = 30 * 60_000;

/**
 * Defaults keyed by the contract's field names (docs/methods/qc.md 7.3). The table leaves spike limits for PAR and wind
 * open ("--"), so those tests are off; PAR is exempt from the flat-line test because night gives a legitimate
 * flat zero. Rows not in 7.3 are marked: o2_umol_l and o2_mg_l are the 7.3 umol/kg row converted with
 * rho ~ 1.025 kg/L and 31.9988 g/mol (rounded), battery_v is a plausibility range only.
 */
export const DEFAULT_QC_LIMITS: Readonly<Record<string, QcLimits>> = Object.freeze({
  temp_c: {
    sensor: { min: -2, max: 40 },
    user: { min: 18, max: 36 },
    spike: { suspect: 0.5, fail: 1.0 },
    rateOfChange: roc(0.0005),
    flatLine: flat(0.0005, 2, 4),
    maxGapMs: GAP,
  },
  sal: {
    sensor: { min: 0, max: 42 },
    user: { min: 28, max: 38 },
    spike: { suspect: 0.2, fail: 0.5 },
    rateOfChange: roc(0.0005),
    flatLine: flat(0.0005, 2, 4),
    maxGapMs: GAP,
  },
  o2_umol_kg: {
    sensor: { min: 0, max: 700 },
    user: { min: 30, max: 450 },
    spike: { suspect: 15, fail: 30 },
    rateOfChange: roc(0.05),
    flatLine: flat(0.05, 2, 4),
    maxGapMs: GAP,
  },
  // Not in 7.3: the umol/kg row x 1.025 kg/L.
  o2_umol_l: {
    sensor: { min: 0, max: 718 },
    user: { min: 31, max: 461 },
    spike: { suspect: 15, fail: 31 },
    rateOfChange: roc(0.05),
    flatLine: flat(0.05, 2, 4),
    maxGapMs: GAP,
  },
  // Not in 7.3: the umol/L row x 31.9988e-3 mg/umol.
  o2_mg_l: {
    sensor: { min: 0, max: 23 },
    user: { min: 1.0, max: 14.8 },
    spike: { suspect: 0.5, fail: 1.0 },
    rateOfChange: roc(0.002),
    flatLine: flat(0.002, 2, 4),
    maxGapMs: GAP,
  },
  pco2_uatm: {
    sensor: { min: 0, max: 3000 },
    user: { min: 100, max: 1200 },
    spike: { suspect: 30, fail: 60 },
    rateOfChange: roc(0.05),
    flatLine: flat(0.05, 3, 6),
    maxGapMs: GAP,
  },
  // Burst mean depth. The sensor maximum is the gauge's range and the user range the site's tide range +- 0.5 m:
  // both are per deployment; 100 m (a 10-bar gauge) is only a placeholder upper bound.
  depth_m: {
    sensor: { min: 0, max: 100 },
    user: {},
    spike: { suspect: 0.3, fail: 0.6 },
    flatLine: flat(0.001, 3, 6),
    maxGapMs: 2 * GAP,
  },
  par_umol_m2_s: { sensor: { min: -5, max: 3000 }, user: { max: 2500 }, maxGapMs: GAP },
  wind_m_s: { sensor: { min: 0, max: 60 }, user: { max: 35 }, flatLine: flat(0.01, 3, 6), maxGapMs: GAP },
  baro_hpa: {
    sensor: { min: 850, max: 1090 },
    user: { min: 950, max: 1050 },
    spike: { suspect: 3, fail: 6 },
    rateOfChange: roc(0.01),
    flatLine: flat(0.01, 6, 12),
    maxGapMs: 3 * HOUR_MS,
  },
  // ADCP total tilt acos(cos p cos r), degrees (docs/methods/currents.md 5.4: 3 above 10 deg, 4 above 20 deg). Feeding it through
  // gross range turns a frame that fell over into a `range` fault alert. Compute it with adcpTilt().
  tilt_deg: { sensor: { min: 0, max: 20 }, user: { max: 10 }, maxGapMs: 3 * HOUR_MS },
  // Not in 7.3: supply voltage plausibility only; low-voltage alerts are the alert engine's `battery` rule.
  battery_v: { sensor: { min: 0, max: 30 }, user: {}, maxGapMs: 3 * HOUR_MS },
} satisfies Record<string, QcLimits>);
