// Sensor-fault state (docs/methods/faults.md 12.7): which faults each sensor has, since when, and when it may be
// trusted again. The processor feeds it every accepted message, every QC result and its watermark, and asks it,
// for a record or a flux window, which of the input sensors were faulty and why. Rules:
// - a fault opens on the QC test that detects it (flat line 4, gross range or stuck-at 4, `spikeCount` spikes in
//   `spikeWindowMs`), on silence past the stale limit (never for irregular kinds), on low voltage, or from outside
//   (a logbook exclusion);
// - its `sinceMs` is the first affected sample where the test knows it (a frozen sensor's first frozen reading),
//   so windows still open when it is detected are judged from the right moment;
// - when the condition ends the sensor is `recovering`, and re-enters only after `reentryPasses` consecutive
//   samples on which the test that raised the fault passes again and the sample is not failed;
// - ended episodes are kept for `retainMs` after they clear, so windows that close late still see them.
// Pure and plain JSON: the state is checkpointed with the processor's.

import {
  cadenceAdd,
  isIrregularKind,
  newCadence,
  staleLimitMs,
  usualIntervalMs,
  type Cadence,
} from './cadence.js';
import { heapPeek, heapPop, heapPush, newDeadlineHeap, type DeadlineHeap } from './deadline-heap.js';

export type SensorFault = 'stale' | 'flatline' | 'range' | 'spike' | 'battery' | 'logbook_exclusion';

/** Faults that make a record flag 4 and a flux window invalid (docs/contract-v1.md section 4, E3); `battery` only warns. */
export const INVALIDATING_FAULTS: readonly SensorFault[] = Object.freeze([
  'stale',
  'flatline',
  'range',
  'spike',
  'logbook_exclusion',
]);

export interface FaultEpisode {
  fault: SensorFault;
  /** Variable whose QC raised it (`pco2_uatm`); absent for whole-sensor faults (stale, battery, logbook). */
  variable?: string;
  /** First affected moment, ms. */
  sinceMs: number;
  /** Event time it was detected, ms (>= sinceMs). */
  detectedMs: number;
  /** When the condition ended (recovering from then), ms; null while it holds. */
  endMs: number | null;
  /** When the sensor re-entered, ms; null while active. The episode covers [sinceMs, clearedMs). */
  clearedMs: number | null;
  /** Consecutive passing samples since endMs. */
  passes: number;
  /** Free text (logbook exclusions). */
  note?: string;
}

export interface SensorFaultEntry {
  kind: string;
  cadence: Cadence;
  /** Deadline in the heap, ms (null: none scheduled). */
  scheduledMs: number | null;
  /** Episodes, oldest first: the active ones and the cleared ones still retained. */
  episodes: FaultEpisode[];
  /** Times of spike-test fails within the spike window per variable, ms. */
  spikeTimes: Record<string, number[]>;
  /** Last sample time counted as a pass for whole-sensor faults (a message with several variables counts once). */
  lastPassMs: number | null;
}

export interface FaultState {
  v: 1;
  watermarkMs: number | null;
  sensors: Record<string, SensorFaultEntry>;
  /** Stale deadlines; rebuilt by faultsRestore() after a JSON round trip would work too. */
  heap: DeadlineHeap;
}

export interface FaultOptions {
  /** Consecutive passing samples before a recovered sensor re-enters (default 3). */
  readonly reentryPasses: number;
  /** Stale limit: factor x usual interval, at least staleMinMs (contract: 3, 5 min). */
  readonly staleFactor: number;
  readonly staleMinMs: number;
  /** Spikes (spike test 4) within the window that make the sensor faulty (default 3 in 60 min, as the alert). */
  readonly spikeCount: number;
  readonly spikeWindowMs: number;
  /** How long cleared episodes are kept for late questions, ms (default 48 h). */
  readonly retainMs: number;
}

export const DEFAULT_FAULT_OPTIONS: FaultOptions = Object.freeze({
  reentryPasses: 3,
  staleFactor: 3,
  staleMinMs: 5 * 60_000,
  spikeCount: 3,
  spikeWindowMs: 60 * 60_000,
  retainMs: 48 * 3_600_000,
});

/** A change of a sensor's fault state, for logs and the dashboard. */
export interface FaultChange {
  key: string;
  fault: SensorFault;
  variable?: string;
  change: 'opened' | 'ended' | 'cleared';
  atMs: number;
  sinceMs: number;
}

/** QC of one sample as libs/qc gives it (structurally: QcResult fits). */
export interface QcOutcome {
  readonly flag: number;
  readonly tests: Readonly<Partial<Record<string, number>>>;
  readonly finalizedPrevious?: {
    readonly tMs: number;
    readonly flag: number;
    readonly tests: Readonly<Partial<Record<string, number>>>;
  };
  readonly flatSinceMs?: number;
  readonly dropped?: string;
}

export const createFaultState = (): FaultState => ({
  v: 1,
  watermarkMs: null,
  sensors: {},
  heap: newDeadlineHeap(),
});

function entry(st: FaultState, key: string, kind: string): SensorFaultEntry {
  let e = st.sensors[key];
  if (e === undefined) {
    e = { kind, cadence: newCadence(), scheduledMs: null, episodes: [], spikeTimes: {}, lastPassMs: null };
    st.sensors[key] = e;
  }
  return e;
}

const openOf = (e: SensorFaultEntry, fault: SensorFault, variable?: string): FaultEpisode | undefined =>
  e.episodes.find((x) => x.fault === fault && x.variable === variable && x.clearedMs === null);

function open(
  e: SensorFaultEntry,
  key: string,
  fault: SensorFault,
  variable: string | undefined,
  sinceMs: number,
  atMs: number,
  out: FaultChange[],
): void {
  const ep = openOf(e, fault, variable);
  if (ep !== undefined) {
    // A fault back before the sensor re-entered: the same episode goes on.
    if (ep.endMs !== null) {
      ep.endMs = null;
      ep.passes = 0;
    }
    return;
  }
  const x: FaultEpisode = { fault, sinceMs, detectedMs: atMs, endMs: null, clearedMs: null, passes: 0 };
  if (variable !== undefined) x.variable = variable;
  e.episodes.push(x);
  out.push(change(key, x, 'opened', atMs));
}

function change(key: string, ep: FaultEpisode, c: FaultChange['change'], atMs: number): FaultChange {
  const ch: FaultChange = { key, fault: ep.fault, change: c, atMs, sinceMs: ep.sinceMs };
  if (ep.variable !== undefined) ch.variable = ep.variable;
  return ch;
}

/** Condition over: recovering from atMs. */
function end(ep: FaultEpisode | undefined, key: string, atMs: number, out: FaultChange[]): void {
  if (ep === undefined || ep.endMs !== null) return;
  ep.endMs = atMs;
  ep.passes = 0;
  out.push(change(key, ep, 'ended', atMs));
}

/** A sample on which the raising test passes: ends the condition if it still held, then counts as a pass. */
function endAndPass(
  ep: FaultEpisode | undefined,
  ok: boolean,
  key: string,
  atMs: number,
  opts: FaultOptions,
  out: FaultChange[],
): void {
  if (ep === undefined) return;
  if (ep.endMs === null) end(ep, key, atMs, out);
  pass(ep, ok, key, atMs, opts, out);
}

/** One passing (true) or failing (false) sample for a recovering episode. */
function pass(
  ep: FaultEpisode | undefined,
  ok: boolean,
  key: string,
  atMs: number,
  opts: FaultOptions,
  out: FaultChange[],
): void {
  if (ep === undefined || ep.endMs === null) return;
  ep.passes = ok ? ep.passes + 1 : 0;
  if (ep.passes >= opts.reentryPasses) {
    ep.clearedMs = atMs;
    out.push(change(key, ep, 'cleared', atMs));
  }
}

/** Stale and not heard from since (a recovering stale sensor that falls silent again is judged afresh). */
const silentNow = (e: SensorFaultEntry): boolean => openOf(e, 'stale')?.endMs === null;

function schedule(st: FaultState, e: SensorFaultEntry, key: string, opts: FaultOptions): void {
  if (isIrregularKind(e.kind) || e.cadence.lastMs === null || silentNow(e)) return;
  const lim = staleLimitMs(e.cadence, opts.staleFactor, opts.staleMinMs);
  if (lim === null) return;
  const due = e.cadence.lastMs + lim;
  if (e.scheduledMs === null || due < e.scheduledMs) {
    e.scheduledMs = due;
    heapPush(st.heap, due, key);
  }
}

/**
 * An accepted message of sensor `key` (`station/sensor`) of `kind`, before its QC. Learns the cadence, ends a
 * stale episode (the sensor speaks again; it re-enters once its samples pass).
 */
export function faultsOnMessage(
  st: FaultState,
  opts: FaultOptions,
  key: string,
  kind: string,
  tMs: number,
): FaultChange[] {
  const out: FaultChange[] = [];
  const e = entry(st, key, kind);
  const stale = openOf(e, 'stale');
  if (!cadenceAdd(e.cadence, tMs, stale === undefined || stale.endMs !== null)) return out;
  if (stale !== undefined) end(stale, key, tMs, out);
  schedule(st, e, key, opts);
  return out;
}

/** The QC result of `variable` for one sample of sensor `key` at tMs. */
export function faultsOnQc(
  st: FaultState,
  opts: FaultOptions,
  key: string,
  kind: string,
  variable: string,
  tMs: number,
  qc: QcOutcome,
): FaultChange[] {
  const out: FaultChange[] = [];
  if (qc.dropped !== undefined) return out;
  const e = entry(st, key, kind);
  const t = qc.tests;
  const failed = qc.flag === 4 || qc.flag === 9;

  // Flat line: opens at 4, ends when the test passes again; that sample is the first pass.
  if (t.flat_line === 4) open(e, key, 'flatline', variable, qc.flatSinceMs ?? tMs, tMs, out);
  else if (t.flat_line === 1) endAndPass(openOf(e, 'flatline', variable), !failed, key, tMs, opts, out);

  // Range: a gross-range fail or a reading stuck at zero or a rail.
  if (t.gross_range === 4 || t.stuck === 4) open(e, key, 'range', variable, tMs, tMs, out);
  else if (t.gross_range !== undefined) {
    endAndPass(openOf(e, 'range', variable), !failed && t.stuck !== 3, key, tMs, opts, out);
  }

  // Spikes: final one sample late (libs/qc), counted per variable in a sliding window.
  const fin = qc.finalizedPrevious;
  const times = (e.spikeTimes[variable] ?? []).filter((x) => x > tMs - opts.spikeWindowMs);
  if (fin !== undefined && fin.tests.spike === 4 && fin.tMs > tMs - opts.spikeWindowMs) times.push(fin.tMs);
  if (times.length > 0) e.spikeTimes[variable] = times;
  else delete e.spikeTimes[variable];
  if (times.length >= opts.spikeCount) open(e, key, 'spike', variable, times[0] as number, tMs, out);
  else if (times.length === 0 && fin !== undefined) {
    endAndPass(openOf(e, 'spike', variable), fin.tests.spike === 1 && fin.flag !== 4, key, tMs, opts, out);
  }

  // Whole-sensor faults re-enter on samples that are not failed, one count per message.
  if (e.lastPassMs === null || tMs > e.lastPassMs) {
    e.lastPassMs = tMs;
    pass(openOf(e, 'stale'), !failed, key, tMs, opts, out);
  }
  return out;
}

/**
 * Supply voltage of sensor `key`: below cutoffV opens `battery` (a warning fault: it does not invalidate data);
 * above cutoffV + clearMarginV ends it, and `reentryPasses` such readings clear it.
 */
export function faultsOnBattery(
  st: FaultState,
  opts: FaultOptions,
  key: string,
  kind: string,
  tMs: number,
  volts: number,
  cutoffV: number,
  clearMarginV = 0.3,
): FaultChange[] {
  const out: FaultChange[] = [];
  if (!Number.isFinite(volts)) return out;
  const e = entry(st, key, kind);
  const ep = openOf(e, 'battery');
  if (volts < cutoffV) open(e, key, 'battery', undefined, tMs, tMs, out);
  else if (volts > cutoffV + clearMarginV) endAndPass(ep, true, key, tMs, opts, out);
  else pass(ep, false, key, tMs, opts, out);
  return out;
}

/**
 * A fault known from outside over [fromMs, toMs) (a logbook exclusion); toMs null keeps it open until a later
 * call with an end. It re-enters at toMs without waiting for passes: the field team says when it is over.
 */
export function faultsExternal(
  st: FaultState,
  key: string,
  kind: string,
  fault: SensorFault,
  fromMs: number,
  toMs: number | null,
  note?: string,
): FaultChange[] {
  const out: FaultChange[] = [];
  const e = entry(st, key, kind);
  const same = e.episodes.find((x) => x.fault === fault && x.sinceMs === fromMs);
  const ep: FaultEpisode = same ?? {
    fault,
    sinceMs: fromMs,
    detectedMs: fromMs,
    endMs: null,
    clearedMs: null,
    passes: 0,
  };
  if (note !== undefined) ep.note = note;
  if (same === undefined) {
    e.episodes.push(ep);
    e.episodes.sort((a, b) => a.sinceMs - b.sinceMs);
    out.push(change(key, ep, 'opened', fromMs));
  }
  if (toMs !== null && ep.clearedMs === null) {
    ep.endMs = toMs;
    ep.clearedMs = toMs;
    out.push(change(key, ep, 'cleared', toMs));
  }
  return out;
}

/**
 * Moves the event-time watermark: opens `stale` for every sensor whose deadline it passed (popped from the deadline
 * heap, earliest first, ties by key), and forgets episodes cleared more than retainMs ago.
 */
export function faultsAdvance(st: FaultState, opts: FaultOptions, watermarkMs: number): FaultChange[] {
  const out: FaultChange[] = [];
  if (st.watermarkMs !== null && watermarkMs <= st.watermarkMs) return out;
  st.watermarkMs = watermarkMs;
  for (
    let top = heapPeek(st.heap);
    top !== undefined && top.deadlineMs < watermarkMs;
    top = heapPeek(st.heap)
  ) {
    heapPop(st.heap);
    const e = st.sensors[top.key];
    if (e === undefined || e.scheduledMs !== top.deadlineMs) continue; // superseded entry
    e.scheduledMs = null;
    const last = e.cadence.lastMs;
    const lim = staleLimitMs(e.cadence, opts.staleFactor, opts.staleMinMs);
    if (last === null || lim === null || silentNow(e)) continue;
    if (last + lim < watermarkMs) {
      // Silent since the first missed message; detected when the silence passed the limit.
      const since = last + (usualIntervalMs(e.cadence) ?? lim);
      open(e, top.key, 'stale', undefined, since, last + lim, out);
    } else schedule(st, e, top.key, opts);
  }
  prune(st, opts, watermarkMs);
  return out;
}

function prune(st: FaultState, opts: FaultOptions, nowMs: number): void {
  for (const e of Object.values(st.sensors)) {
    if (e.episodes.length === 0) continue;
    const keep = e.episodes.filter((x) => x.clearedMs === null || x.clearedMs > nowMs - opts.retainMs);
    if (keep.length !== e.episodes.length) e.episodes = keep;
  }
}

/** Episodes of sensor `key` in force at atMs (sinceMs <= atMs < clearedMs), as known now. */
export function activeFaults(st: FaultState, key: string, atMs: number): FaultEpisode[] {
  const e = st.sensors[key];
  if (e === undefined) return [];
  return e.episodes.filter((x) => x.sinceMs <= atMs && (x.clearedMs === null || atMs < x.clearedMs));
}

/** Episodes of sensor `key` overlapping [fromMs, toMs]. */
export function faultsDuring(st: FaultState, key: string, fromMs: number, toMs: number): FaultEpisode[] {
  const e = st.sensors[key];
  if (e === undefined) return [];
  return e.episodes.filter((x) => x.sinceMs <= toMs && (x.clearedMs === null || x.clearedMs > fromMs));
}

/**
 * The `invalid_reasons` of a record or window built from `keys` over [fromMs, toMs] (docs/contract-v1.md section 4, E3):
 * `input_fault:<station>/<sensor>/<fault>` for each invalidating fault, sorted, without repeats.
 */
export function invalidReasons(
  st: FaultState,
  keys: readonly string[],
  fromMs: number,
  toMs: number,
): string[] {
  const out = new Set<string>();
  for (const key of keys) {
    for (const ep of faultsDuring(st, key, fromMs, toMs)) {
      if (INVALIDATING_FAULTS.includes(ep.fault)) out.add(`input_fault:${key}/${ep.fault}`);
    }
  }
  return [...out].sort();
}

/**
 * After a JSON round trip the heap is data like the rest; this rebuilds it from the per-sensor deadlines anyway
 * (a state written by an older version, or one edited by hand, still detects silences).
 */
export function faultsRestore(st: FaultState, opts: FaultOptions): FaultState {
  st.heap = newDeadlineHeap();
  for (const key of Object.keys(st.sensors).sort()) {
    const e = st.sensors[key] as SensorFaultEntry;
    if (e.scheduledMs !== null) heapPush(st.heap, e.scheduledMs, key);
    else schedule(st, e, key, opts);
  }
  return st;
}
