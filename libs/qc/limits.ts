// Starting QC thresholds for a reef flat: docs/methods/qc.md 7.3 (engineering defaults, not published values), in the
// style of the U.S. IOOS QARTOD manuals (7.1). Tune per site and instrument; every value here can be overridden
// through createQcState(). The noise-aware floors, the repeat (frozen sensor) and stuck-at tests are
// docs/methods/faults.md 12.1-12.3.

import { DEFAULT_NOISE_LIMITS, type NoiseLimits } from './noise.js';

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
  /**
   * Noise floors (docs/methods/faults.md 12.2): the limits are never below noiseSuspect (noiseFail) x the sensor's
   * measured sd of the spike statistic plus its resolution. Defaults 5 and 8.
   */
  readonly noiseSuspect?: number;
  readonly noiseFail?: number;
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
  /**
   * Noise floor (docs/methods/faults.md 12.2): the limit is never below noiseK x the measured sd of the sensor's
   * own steps plus its resolution. Default 5.
   */
  readonly noiseK?: number;
}

export interface FlatLineLimits {
  /** Values within eps of V_n count as unchanged (variable's unit). */
  readonly eps: number;
  /** All values over the last suspectMs within eps gives 3. */
  readonly suspectMs: number;
  /** ... over the last failMs gives 4. */
  readonly failMs: number;
}

/**
 * Repeat test (docs/methods/faults.md 12.3): a run of bit-identical readings judged against how often this sensor
 * repeats itself when healthy. The run length that flags 4 is the shortest N >= minRun with p^(N-1) <= alpha
 * (p: the repeat chance from the noise profile); the run one shorter gives 3. Not evaluated when p > maxRepeatP
 * or N > maxRun (a coarsely resolved or slowly varying signal: the eps/T rule judges it).
 */
export interface RepeatLimits {
  /** Chance of a false freeze per sample on healthy data (default 1e-5). */
  readonly alpha: number;
  /** Fewest identical readings that can flag 4 (default 4). */
  readonly minRun: number;
  /** Longest run the test will wait for (default 12). */
  readonly maxRun: number;
  /** Above this healthy repeat chance the test is not evaluated (default 0.2). */
  readonly maxRepeatP: number;
}

/**
 * Stuck-at test (docs/methods/faults.md 12.3): a reading exactly at one of `values` (zero, a rail of the sensor's
 * range) gives 3, and `count` of them in a row give 4.
 */
export interface StuckLimits {
  readonly values: readonly number[];
  readonly count: number;
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
  readonly repeat?: RepeatLimits;
  readonly stuck?: StuckLimits;
  /** Noise profile settings for the noise floors and the repeat test (default DEFAULT_NOISE_LIMITS). */
  readonly noise?: NoiseLimits;
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
const REPEAT: RepeatLimits = Object.freeze({ alpha: 1e-5, minRun: 4, maxRun: 12, maxRepeatP: 0.2 });
/** Stuck at zero or at either rail of the sensor range, two in a row to fail. */
const stuck = (...values: number[]): StuckLimits => ({ values, count: 2 });
export { DEFAULT_NOISE_LIMITS };

/**
 * Defaults keyed by the contract's field names (docs/methods/qc.md 7.3). The table leaves spike limits for PAR and wind
 * open ("--"), so those tests are off; PAR is exempt from the flat-line test because night gives a legitimate
 * flat zero; it has no repeat or stuck-at-zero test either. The repeat test (docs/methods/faults.md 12.3) is on for
 * every signal that normally differs at each sample; it stays silent by itself where repeats are normal. Rows not in 7.3 are marked: o2_umol_l and o2_mg_l are the 7.3 umol/kg row converted with
 * rho ~ 1.025 kg/L and 31.9988 g/mol (rounded), battery_v is a plausibility range only.
 */
export const DEFAULT_QC_LIMITS: Readonly<Record<string, QcLimits>> = Object.freeze({
  temp_c: {
    sensor: { min: -2, max: 40 },
    user: { min: 18, max: 36 },
    spike: { suspect: 0.5, fail: 1.0 },
    rateOfChange: roc(0.0005),
    flatLine: flat(0.0005, 2, 4),
    repeat: REPEAT,
    stuck: stuck(0, -2, 40),
    maxGapMs: GAP,
  },
  sal: {
    sensor: { min: 0, max: 42 },
    user: { min: 28, max: 38 },
    spike: { suspect: 0.2, fail: 0.5 },
    rateOfChange: roc(0.0005),
    flatLine: flat(0.0005, 2, 4),
    repeat: REPEAT,
    stuck: stuck(0, 42),
    maxGapMs: GAP,
  },
  o2_umol_kg: {
    sensor: { min: 0, max: 700 },
    user: { min: 30, max: 450 },
    spike: { suspect: 15, fail: 30 },
    rateOfChange: roc(0.05),
    flatLine: flat(0.05, 2, 4),
    repeat: REPEAT,
    stuck: stuck(0, 700),
    maxGapMs: GAP,
  },
  // Not in 7.3: the umol/kg row x 1.025 kg/L.
  o2_umol_l: {
    sensor: { min: 0, max: 718 },
    user: { min: 31, max: 461 },
    spike: { suspect: 15, fail: 31 },
    rateOfChange: roc(0.05),
    flatLine: flat(0.05, 2, 4),
    repeat: REPEAT,
    stuck: stuck(0, 718),
    maxGapMs: GAP,
  },
  // Not in 7.3: the umol/L row x 31.9988e-3 mg/umol.
  o2_mg_l: {
    sensor: { min: 0, max: 23 },
    user: { min: 1.0, max: 14.8 },
    spike: { suspect: 0.5, fail: 1.0 },
    rateOfChange: roc(0.002),
    flatLine: flat(0.002, 2, 4),
    repeat: REPEAT,
    stuck: stuck(0, 23),
    maxGapMs: GAP,
  },
  pco2_uatm: {
    sensor: { min: 0, max: 3000 },
    user: { min: 100, max: 1200 },
    spike: { suspect: 30, fail: 60 },
    rateOfChange: roc(0.05),
    flatLine: flat(0.05, 3, 6),
    repeat: REPEAT,
    stuck: stuck(0, 3000),
    maxGapMs: GAP,
  },
  // Burst mean depth. The sensor maximum is the gauge's range and the user range the site's tide range +- 0.5 m:
  // both are per deployment; 100 m (a 10-bar gauge) is only a placeholder upper bound.
  depth_m: {
    sensor: { min: 0, max: 100 },
    user: {},
    spike: { suspect: 0.3, fail: 0.6 },
    flatLine: flat(0.001, 3, 6),
    repeat: REPEAT,
    stuck: stuck(0),
    maxGapMs: 2 * GAP,
  },
  par_umol_m2_s: { sensor: { min: -5, max: 3000 }, user: { max: 2500 }, maxGapMs: GAP },
  // No repeat test: a calm reads 0.00 again and again. Stuck only at the top rail.
  wind_m_s: {
    sensor: { min: 0, max: 60 },
    user: { max: 35 },
    flatLine: flat(0.01, 3, 6),
    stuck: stuck(60),
    maxGapMs: GAP,
  },
  baro_hpa: {
    sensor: { min: 850, max: 1090 },
    user: { min: 950, max: 1050 },
    spike: { suspect: 3, fail: 6 },
    rateOfChange: roc(0.01),
    flatLine: flat(0.01, 6, 12),
    repeat: REPEAT,
    maxGapMs: 3 * HOUR_MS,
  },
  // ADCP total tilt acos(cos p cos r), degrees (docs/methods/currents.md 5.4: 3 above 10 deg, 4 above 20 deg). Feeding it through
  // gross range turns a frame that fell over into a `range` fault alert. Compute it with adcpTilt().
  tilt_deg: { sensor: { min: 0, max: 20 }, user: { max: 10 }, maxGapMs: 3 * HOUR_MS },
  // Not in 7.3: supply voltage plausibility only; low-voltage alerts are the alert engine's `battery` rule.
  battery_v: { sensor: { min: 0, max: 30 }, user: {}, stuck: stuck(0), maxGapMs: 3 * HOUR_MS },
} satisfies Record<string, QcLimits>);
