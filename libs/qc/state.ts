// Incremental QC of one variable of one sensor, QARTOD-style tests in the order of docs/methods/qc.md 7.2. Bounded
// memory: the last two samples plus three fixed-size binned windows (binned-stats.ts). Pure: the caller feeds
// event time and keeps the state.

import { createBinnedStats, binnedAdd, binnedSummary, type BinnedStats } from './binned-stats.js';
import { aggregateFlags, type QcFlag } from './flags.js';
import { DEFAULT_QC_LIMITS, type QcLimits } from './limits.js';
import { attenuatedFlag, climatology, grossRange, rateOfChange, spike, timing } from './tests.js';

/** Names of the per-sample tests, as reported in `tests`. */
export type QcTestName =
  'timing' | 'gross_range' | 'climatology' | 'spike' | 'rate_of_change' | 'flat_line' | 'attenuated_signal';

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

/** Plain JSON-safe data: JSON.parse(JSON.stringify(state)) resumes exactly (the processor snapshots it). */
export interface QcState {
  readonly variable: string;
  readonly limits: QcLimits;
  /** Time of the last sample, ms; null before the first. */
  lastMs: number | null;
  /** V_{n-1}: its spike flag is still open until the next sample arrives. */
  prev: Sample | null;
  /** V_{n-2}, kept for V_{n-1}'s spike test. */
  prev2: Sample | null;
  readonly roc: BinnedStats | null;
  readonly flat: BinnedStats | null;
  readonly att: BinnedStats | null;
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
}

/**
 * A QC state for one variable. Limits default to DEFAULT_QC_LIMITS[variable]; each key given in `config`
 * replaces the default one (a whole test's limits at a time). Throws REEFD_QC_UNKNOWN_VARIABLE for a variable
 * with no defaults unless `sensor` limits are given.
 */
export function createQcState(config: QcConfig | string): QcState {
  const cfg: QcConfig = typeof config === 'string' ? { variable: config } : config;
  const base = DEFAULT_QC_LIMITS[cfg.variable];
  if (base === undefined && cfg.sensor === undefined) {
    throw new Error(
      `REEFD_QC_UNKNOWN_VARIABLE: no default QC limits for "${cfg.variable}"; give sensor limits in its QC config ` +
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
  return {
    variable,
    limits,
    lastMs: null,
    prev: null,
    prev2: null,
    roc: limits.rateOfChange ? createBinnedStats(limits.rateOfChange.windowMs, 100) : null,
    flat: limits.flatLine ? createBinnedStats(limits.flatLine.failMs, 64) : null,
    att: limits.attenuated ? createBinnedStats(limits.attenuated.windowMs, 64) : null,
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
    return finalizedPrevious ? { flag: 9, tests: {}, finalizedPrevious } : { flag: 9, tests: {} };
  }

  const tests: QcTests = {};
  if (tim !== undefined) tests.timing = tim;
  tests.gross_range = gross;
  tests.climatology = climatology(value, tMs, lim.climatology);
  if (lim.spike) tests.spike = 2; // provisional until V_{n+1}
  if (lim.rateOfChange && state.roc) {
    const r = lim.rateOfChange;
    const w = binnedSummary(state.roc, tMs - r.windowMs, tMs);
    const sd = w.n >= r.minSamples ? w.sd : Number.NaN;
    tests.rate_of_change =
      gapOk && prev !== null && prev.good && prev.v !== null
        ? rateOfChange(prev.v, value, sd, r.nSd, r.minSd)
        : 2;
    if (usable) binnedAdd(state.roc, tMs, value);
  }
  if (lim.flatLine && state.flat) {
    if (usable) binnedAdd(state.flat, tMs, value);
    tests.flat_line = flatLineFlag(state.flat, tMs, value, lim.flatLine);
  }
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
  return finalizedPrevious ? { flag, tests, finalizedPrevious } : { flag, tests };
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
    tests.spike = s.good && p2 !== null && p2.good && p2.v !== null ? spike(p2.v, s.v, next, lim) : 2;
  }
  return { tMs: s.tMs, flag: aggregateFlags(Object.values(tests)), tests };
}

/**
 * Flat line (test 7): all values over the last T_s (T_f) within eps of V_n gives 3 (4). Resolved to the bins of
 * the window (T_f / 64): bins overlapping the span count whole, and the span counts as covered when the first
 * sample in it is no later than one bin after its start. 2 until the span is covered.
 */
function flatLineFlag(
  s: BinnedStats,
  tMs: number,
  v: number,
  f: { eps: number; suspectMs: number; failMs: number },
): QcFlag {
  const within = (spanMs: number): boolean | undefined => {
    const w = binnedSummary(s, tMs - spanMs, tMs);
    if (!(w.firstMs <= tMs - spanMs + s.binMs) || w.n < 2) return undefined;
    return w.min >= v - f.eps && w.max <= v + f.eps;
  };
  const sus = within(f.suspectMs);
  if (sus === undefined) return 2;
  if (!sus) return 1;
  return within(f.failMs) === true ? 4 : 3;
}
