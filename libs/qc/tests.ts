// Single QARTOD-style tests as pure functions (U.S. IOOS QARTOD manuals, docs/methods/qc.md 7.1-7.2; from memory: verify
// current versions). Each returns a flag; the incremental state in state.ts strings them together.

import type { QcFlag } from './flags.js';
import type {
  AttenuatedLimits,
  Bounds,
  ClimatologyTable,
  RateOfChangeLimits,
  RepeatLimits,
  SpikeLimits,
  StuckLimits,
} from './limits.js';

const isMissing = (v: number): boolean => !Number.isFinite(v);

/**
 * Gross range (test 3): outside the sensor range 4, outside the user range 3, else 1; 9 for a missing
 * (non-finite) value. Bounds are inclusive (a value equal to a limit passes).
 */
export function grossRange(value: number, sensor: Bounds, user: Bounds = {}): QcFlag {
  if (isMissing(value)) return 9;
  if ((sensor.min !== undefined && value < sensor.min) || (sensor.max !== undefined && value > sensor.max))
    return 4;
  if ((user.min !== undefined && value < user.min) || (user.max !== undefined && value > user.max)) return 3;
  return 1;
}

/**
 * Climatology (test 4): outside the monthly envelope of the sample's UTC month 3, inside 1; 2 without a table,
 * with less than one year of data behind it, or with no envelope for that month.
 */
export function climatology(value: number, tMs: number, table: ClimatologyTable | undefined): QcFlag {
  if (isMissing(value)) return 9;
  if (table === undefined || !(table.years >= 1)) return 2;
  const env = table.monthly[new Date(tMs).getUTCMonth()];
  if (env === undefined || env === null) return 2;
  if ((env.min !== undefined && value < env.min) || (env.max !== undefined && value > env.max)) return 3;
  return 1;
}

/**
 * Spike (test 5): |V_n - (V_{n-1} + V_{n+1})/2| above `suspect` gives 3, above `fail` gives 4 (strict: a value
 * exactly at a threshold is not flagged). Evaluated literally as written, so values at a threshold round the same
 * way as other implementations of the manual's formula (see the test).
 */
export function spike(prev: number, cur: number, next: number, limits: SpikeLimits): QcFlag {
  if (isMissing(cur)) return 9;
  if (isMissing(prev) || isMissing(next)) return 2;
  const d = Math.abs(cur - (prev + next) / 2);
  if (d > limits.fail) return 4;
  if (d > limits.suspect) return 3;
  return 1;
}

/** Rate of change (test 6): |V_n - V_{n-1}| > nSd x max(sd, minSd) gives 3, else 1; 2 when sd is unknown. */
export function rateOfChange(prev: number, cur: number, sd: number, nSd: number, minSd = 0): QcFlag {
  if (isMissing(cur)) return 9;
  if (isMissing(prev) || !Number.isFinite(sd)) return 2;
  return Math.abs(cur - prev) > nSd * Math.max(sd, minSd) ? 3 : 1;
}

/**
 * Attenuated signal (test 8) on a block of values, e.g. one pressure burst (docs/methods/qc.md 7.3: burst sd < 0.002 m).
 * Non-finite values are skipped. 2 when fewer than minSamples finite values.
 */
export function attenuatedSignal(values: ArrayLike<number>, limits: AttenuatedLimits): QcFlag {
  let n = 0;
  let mean = 0;
  let m2 = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i] ?? Number.NaN;
    if (!Number.isFinite(v)) continue;
    n++;
    const d = v - mean;
    mean += d / n;
    m2 += d * (v - mean);
    if (v < min) min = v;
    if (v > max) max = v;
  }
  if (n < Math.max(2, limits.minSamples)) return 2;
  return attenuatedFlag(limits.measure === 'sd' ? Math.sqrt(m2 / (n - 1)) : max - min, limits);
}

/** Flag for a measure of variation (sd or range) against attenuated-signal limits. */
export function attenuatedFlag(variation: number, limits: AttenuatedLimits): QcFlag {
  if (!Number.isFinite(variation)) return 2;
  if (limits.failBelow !== undefined && variation < limits.failBelow) return 4;
  if (variation < limits.suspectBelow) return 3;
  return 1;
}

/**
 * Timing (test 1): a sample stamped more than `maxAheadMs` (default 1 min, docs/methods/qc.md 7.2) after its receive time
 * means a clock fault: 4; otherwise 1. Without a receive time: 2.
 */
export function timing(sampleMs: number, receiveMs: number | undefined, maxAheadMs = 60_000): QcFlag {
  if (receiveMs === undefined || !Number.isFinite(receiveMs)) return 2;
  return sampleMs - receiveMs > maxAheadMs ? 4 : 1;
}

/**
 * Spike limits raised to the sensor's noise floor (docs/methods/faults.md 12.2): each limit is at least
 * k x spikeSd + resolution, k = noiseSuspect (5) / noiseFail (8). With Gaussian noise 5 sd is exceeded on
 * 6e-7 of samples (common practice: normal tail), so the floor keeps clean data far below 1 % false flags.
 */
export function spikeLimitsWithFloor(
  limits: SpikeLimits,
  spikeSd: number | null,
  resolution: number,
): SpikeLimits {
  if (spikeSd === null) return limits;
  return {
    suspect: Math.max(limits.suspect, (limits.noiseSuspect ?? 5) * spikeSd + resolution),
    fail: Math.max(limits.fail, (limits.noiseFail ?? 8) * spikeSd + resolution),
  };
}

/**
 * The sd floor of the rate-of-change test with the noise floor of docs/methods/faults.md 12.2: the limit
 * nSd x max(sd, floor) is never below noiseK x stepSd + resolution. On constant water the 25-h sd is the noise sd
 * s while a step has sd s sqrt(2), so 3 sd alone flags 3.4 % of clean steps (P(|Z| > 2.12), normal tail); the floor
 * (5 step sd) flags under 1e-6.
 */
export function rateOfChangeFloor(
  limits: RateOfChangeLimits,
  stepSd: number | null,
  resolution: number,
): number {
  if (stepSd === null) return limits.minSd;
  return Math.max(limits.minSd, ((limits.noiseK ?? 5) * stepSd + resolution) / limits.nSd);
}

/**
 * Identical readings needed to call a sensor frozen (docs/methods/faults.md 12.3): the shortest run N >= minRun
 * with p^(N-1) <= alpha, where p is the sensor's healthy chance of repeating a reading. Null (test not
 * evaluated) when p is unknown, above maxRepeatP, or N would exceed maxRun. Check: p = 0.02, alpha 1e-5 gives
 * N = 4 (0.02^3 = 8e-6; hand-computed), i.e. 30 min at a 10-min cadence.
 */
export function repeatRunNeeded(p: number | null, limits: RepeatLimits): number | null {
  if (p === null || !(p <= limits.maxRepeatP)) return null;
  if (p <= 0) return limits.minRun;
  const n = 1 + Math.ceil(Math.log(limits.alpha) / Math.log(p) - 1e-12);
  const run = Math.max(limits.minRun, n);
  return run > limits.maxRun ? null : run;
}

/** Repeat flag of a run of `length` identical readings: 4 at `needed`, 3 one short (when that is >= 3), else 1. */
export function repeatFlag(length: number, needed: number | null): QcFlag {
  if (needed === null) return 2;
  if (length >= needed) return 4;
  if (length >= needed - 1 && needed - 1 >= 3) return 3;
  return 1;
}

/** True when a reading sits exactly on one of the stuck-at values (zero, a rail). */
export const isStuckValue = (v: number, limits: StuckLimits): boolean => limits.values.includes(v);

/** Stuck-at flag for `count` consecutive readings on a stuck-at value: 0 gives 1, then 3, and 4 at limits.count. */
export function stuckFlag(count: number, limits: StuckLimits): QcFlag {
  if (count <= 0) return 1;
  return count >= limits.count ? 4 : 3;
}
