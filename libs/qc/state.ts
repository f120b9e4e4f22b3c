// Incremental QC of one variable of one sensor, QARTOD-style tests in the order of docs/methods/qc.md 7.2, with the
// noise-aware floors, repeat and stuck-at tests of docs/methods/faults.md 12.1-12.3. Bounded memory sized to the
// tests in use: the last two samples, a binned window per windowed test (binned-stats.ts, only the bins that hold
// samples), a noise profile when a test reads it. Pure: the caller feeds event time and keeps the state.

import { createBinnedStats, binnedAdd, binnedSummary, type BinnedStats } from './binned-stats.js';
import { epsFlatLine, repeatStep, worseFlat, type FlatVerdict, type RepeatRun } from './flatline.js';
import { aggregateFlags, type QcFlag } from './flags.js';
import { DEFAULT_QC_LIMITS, type QcLimits } from './limits.js';
import { DEFAULT_NOISE_LIMITS, newNoiseProfile, noiseAdd, noiseScales, type NoiseProfile } from './noise.js';
import {
  attenuatedFlag,
  climatology,
  grossRange,
  isStuckValue,
  rateOfChange,
  rateOfChangeFloor,
  spike,
  spikeLimitsWithFloor,
  stuckFlag,
  timing,
} from './tests.js';
import { QC_ERRORS } from './errors.js';

/** Names of the per-sample tests, as reported in `tests`. */
export type QcTestName =
  | 'timing'
  | 'gross_range'
  | 'stuck'
  | 'climatology'
  | 'spike'
  | 'rate_of_change'
  | 'flat_line'
  | 'attenuated_signal';

export type QcTests = Partial<Record<QcTestName, QcFlag>>;

export interface QcConfig extends Partial<QcLimits> {
  /** Contract field name; selects the defaults in DEFAULT_QC_LIMITS (e.g. `temp_c`). */
  readonly variable: string;
}

interface Sample {
  tMs: number;
  /** null for a missing value (JSON has no NaN). */
  v: number | null;
  /** Usable as a neighbour for the spike and rate-of-change tests (not 4 or 9). */
  good: boolean;
  tests: QcTests;
}

/** Layout version of QcState; a state of another layout is reset on its next update (windows re-learn). */
export const QC_STATE_VERSION = 2;

/** Plain JSON-safe data: JSON.parse(JSON.stringify(state)) resumes exactly (the processor snapshots it). */
export interface QcState {
  readonly v: typeof QC_STATE_VERSION;
  readonly variable: string;
  readonly limits: QcLimits;
  /** Time of the last sample, ms; null before the first. */
  lastMs: number | null;
  /** V_{n-1}: its spike flag is still open until the next sample arrives. */
  prev: Sample | null;
  /** V_{n-2}, kept for V_{n-1}'s spike test. */
  prev2: Sample | null;
  /** 25-h moments for the rate-of-change sd (null without that test). */
  roc: BinnedStats | null;
  /** Extremes over T_f for the eps/T flat line (null without that test). */
  flat: BinnedStats | null;
  att: BinnedStats | null;
  /** Noise and resolution (null unless a spike, rate-of-change or repeat test reads it). */
  noise: NoiseProfile | null;
  /** Current run of identical readings (repeat test). */
  run: RepeatRun | null;
  /** Consecutive readings on a stuck-at value (stuck test). */
  stuckCount: number;
}

export interface QcFinalized {
  readonly tMs: number;
  readonly flag: QcFlag;
  readonly tests: QcTests;
}

export interface QcResult {
  /** Flag of V_n. Provisional: its spike test is 2 until V_{n+1} arrives (then see finalizedPrevious). */
  readonly flag: QcFlag;
  readonly tests: QcTests;
  /** Final flag of the previous sample V_{n-1}, now that V_n gave its spike test a right-hand neighbour. */
  readonly finalizedPrevious?: QcFinalized;
  /** Set when the sample was dropped: a repeated time (duplicate) or a time before the last one. */
  readonly dropped?: 'duplicate' | 'out_of_order';
  /** When flat_line is 3 or 4: the start of the flat stretch (a frozen sensor's first frozen reading), ms. */
  readonly flatSinceMs?: number;
}

/** Window bins per test: the window edge is resolved to window / bins (docs/methods/faults.md 12.6). */
const ROC_BINS = 25; // 25 h in 1-h bins
const FLAT_BINS = 32; // T_f in 32 bins: 7.5 min for a 4-h T_f
const ATT_BINS = 32;

/**
 * A QC state for one variable. Limits default to DEFAULT_QC_LIMITS[variable]; each key given in `config`
 * replaces the default one (a whole test's limits at a time). Throws REEFD_QC_UNKNOWN_VARIABLE for a variable
 * with no defaults unless `sensor` limits are given.
 */
export function createQcState(config: QcConfig | string): QcState {
  const cfg: QcConfig = typeof config === 'string' ? { variable: config } : config;
  const base = DEFAULT_QC_LIMITS[cfg.variable];
  if (base === undefined && cfg.sensor === undefined) {
    throw QC_ERRORS.error(
      'REEFD_QC_UNKNOWN_VARIABLE',
      `no default QC limits for "${cfg.variable}"; give sensor limits in its QC config ` +
        `or use one of ${Object.keys(DEFAULT_QC_LIMITS).join(', ')}`,
    );
  }
  const { variable, ...overrides } = cfg;
  const limits: QcLimits = {
    sensor: {},
    user: {},
    maxGapMs: 30 * 60_000,
    ...base,
    ...stripUndefined(overrides),
  };
  return { v: QC_STATE_VERSION, variable, limits, ...freshWindows(limits) };
}

function freshWindows(limits: QcLimits) {
  return {
    lastMs: null,
    prev: null,
    prev2: null,
    roc: limits.rateOfChange ? createBinnedStats(limits.rateOfChange.windowMs, ROC_BINS, 'moments') : null,
    flat: limits.flatLine ? createBinnedStats(limits.flatLine.failMs, FLAT_BINS, 'extremes') : null,
    att: limits.attenuated
      ? createBinnedStats(
          limits.attenuated.windowMs,
          ATT_BINS,
          limits.attenuated.measure === 'sd' ? 'moments' : 'extremes',
        )
      : null,
    noise: limits.spike || limits.rateOfChange || limits.repeat ? newNoiseProfile() : null,
    run: null,
    stuckCount: 0,
  };
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}

/**
 * Runs the tests on (tMs, value) and advances the state. `receiveMs` (optional) enables the timing test.
 * A non-finite value is missing (flag 9) and only closes the previous sample's spike test.
 */
export function qcUpdate(state: QcState, tMs: number, value: number, receiveMs?: number): QcResult {
  if (state.v !== QC_STATE_VERSION) Object.assign(state, { v: QC_STATE_VERSION }, freshWindows(state.limits));
  if (state.lastMs !== null && tMs === state.lastMs)
    return { flag: 4, tests: { timing: 4 }, dropped: 'duplicate' };
  if (state.lastMs !== null && tMs < state.lastMs)
    return { flag: 4, tests: { timing: 4 }, dropped: 'out_of_order' };
  const lim = state.limits;
  const prev = state.prev;
  const gapOk = prev !== null && tMs - prev.tMs <= lim.maxGapMs;

  // Judge V_n's own usability first: a failed V_n is no neighbour for V_{n-1}'s spike test.
  const tim = receiveMs === undefined ? undefined : timing(tMs, receiveMs);
  const gross = grossRange(value, lim.sensor, lim.user);
  const usable = Number.isFinite(value) && gross !== 4 && tim !== 4;
  const finalizedPrevious =
    prev === null ? undefined : finalize(state, prev, gapOk && usable ? value : Number.NaN);
  state.lastMs = tMs;

  if (!Number.isFinite(value)) {
    state.prev2 = null;
    state.prev = { tMs, v: null, good: false, tests: {} };
    state.run = null;
    return finalizedPrevious ? { flag: 9, tests: {}, finalizedPrevious } : { flag: 9, tests: {} };
  }

  const tests: QcTests = {};
  if (tim !== undefined) tests.timing = tim;
  tests.gross_range = gross;
  if (lim.stuck) {
    state.stuckCount = isStuckValue(value, lim.stuck) ? state.stuckCount + 1 : 0;
    tests.stuck = stuckFlag(state.stuckCount, lim.stuck);
  }
  tests.climatology = climatology(value, tMs, lim.climatology);
  if (lim.spike) tests.spike = 2; // provisional until V_{n+1}
  const prevV = gapOk && prev !== null && prev.good ? prev.v : null;
  const contiguous = prevV !== null;
  const noiseLim = lim.noise ?? DEFAULT_NOISE_LIMITS;
  const scales = state.noise ? noiseScales(state.noise, noiseLim) : null;
  if (lim.rateOfChange && state.roc) {
    const r = lim.rateOfChange;
    const w = binnedSummary(state.roc, tMs - r.windowMs, tMs);
    const sd = w.n >= r.minSamples ? w.sd : Number.NaN;
    const floor = rateOfChangeFloor(r, scales?.stepSd ?? null, scales?.resolution ?? 0);
    tests.rate_of_change = prevV !== null ? rateOfChange(prevV, value, sd, r.nSd, floor) : 2;
    if (usable) binnedAdd(state.roc, tMs, value);
  }

  let flat: FlatVerdict | undefined;
  if (lim.flatLine && state.flat) {
    if (usable) binnedAdd(state.flat, tMs, value);
    flat = epsFlatLine(state.flat, tMs, value, lim.flatLine);
  }
  if (usable && state.noise) {
    if (lim.repeat) {
      const step = repeatStep(state.run, state.noise, lim.repeat, noiseLim, tMs, value, contiguous);
      state.run = step.run;
      flat = flat === undefined ? step.verdict : worseFlat(flat, step.verdict);
    }
    noiseAdd(state.noise, value, contiguous, noiseLim);
  } else if (!usable) state.run = null;
  if (flat !== undefined) tests.flat_line = flat.flag;

  if (lim.attenuated && state.att) {
    const a = lim.attenuated;
    if (usable) binnedAdd(state.att, tMs, value);
    const w = binnedSummary(state.att, tMs - a.windowMs, tMs);
    const covered = w.firstMs <= tMs - a.windowMs + state.att.binMs && w.n >= Math.max(2, a.minSamples);
    tests.attenuated_signal = covered ? attenuatedFlag(a.measure === 'sd' ? w.sd : w.max - w.min, a) : 2;
  }

  state.prev2 = gapOk ? prev : null;
  state.prev = { tMs, v: value, good: usable, tests };
  const flag = aggregateFlags(Object.values(tests));
  const out: QcResult = { flag, tests };
  return {
    ...out,
    ...(finalizedPrevious ? { finalizedPrevious } : {}),
    ...(flat?.sinceMs !== undefined ? { flatSinceMs: flat.sinceMs } : {}),
  };
}

/**
 * Closes the open sample (its spike test becomes 2) and returns its final flag, e.g. at the end of a replay or
 * when the stream is known to have stopped. Returns undefined when nothing is open.
 */
export function qcFlush(state: QcState): QcFinalized | undefined {
  const prev = state.prev;
  if (prev === null) return undefined;
  const out = finalize(state, prev, Number.NaN);
  state.prev = null;
  state.prev2 = null;
  return out;
}

function finalize(state: QcState, s: Sample, next: number): QcFinalized {
  if (s.v === null) return { tMs: s.tMs, flag: 9, tests: {} };
  const tests: QcTests = { ...s.tests };
  const lim = state.limits.spike;
  if (lim) {
    const p2 = state.prev2;
    const scales = state.noise ? noiseScales(state.noise, state.limits.noise ?? DEFAULT_NOISE_LIMITS) : null;
    const floored = spikeLimitsWithFloor(lim, scales?.spikeSd ?? null, scales?.resolution ?? 0);
    tests.spike = s.good && p2 !== null && p2.good && p2.v !== null ? spike(p2.v, s.v, next, floored) : 2;
  }
  return { tMs: s.tMs, flag: aggregateFlags(Object.values(tests)), tests };
}
