// Late lab results, live (docs/methods/calibration.md 13.7): a bottle sample that arrives after the windows
// holding it have closed is re-derived, and the records it changes go out again with `revision` 1, 2, ... and
// their identity unchanged (libs/contract recordKey), so every output replaces them.
//
// How: the processor keeps snapshots of the part of its state a lab result can change (scope.ts: the stations
// with bottle samplers, their transects and the met mast), one per hour of event time, and the messages it
// accepted since the oldest (ring.ts; of messages outside the scope, only their time), over `reviseMaxAgeMs`.
// A late sample is derived at once as before (later windows use it) and noted; before the next other message
// (or at drain) a scratch processor of the scope starts from the latest snapshot taken before the earliest
// noted sample and replays the messages since, in the order `reefd replay` uses (late samples at their event
// time), up to the present. Its records are compared with those sent (a
// hash per identity, in memory): those that differ go out as revisions. Its state (series, the flux results
// the inverse's storage chain starts from) replaces the live one, so later windows continue from the revised ones.
// Being a rewind, not a warm-up, the revised records are bit for bit what `reefd replay` gives for the same
// archive, QC flags and chained states included. Pure and deterministic: the same messages in the same order
// give the same records and revisions, live, on restart-resume and in tests.
//
// Bounds: the scope's snapshots and messages over the reach, at most MAX_RING_MESSAGES; the hash table of the
// scope's records over the same span; one scratch run per batch of late samples (those arriving together
// share it). A site without bottle samplers keeps nothing. A sample older than the reach, or from before a
// restart (the ring is not in the checkpoint), is used from then on only and counted (lateSamplesNotRevised).
import {
  recordKey,
  type DerivedRecord,
  type Kind,
  type ReefdConfig,
  type SensorMessage,
} from '../contract/index.js';
import type { ProcessorOptions } from './field.js';
import { kindModules } from './kinds/index.js';
import type { Core, Processor } from './processor.js';
import { MessageRing, type RingEntry } from './ring.js';
import { adoptScoped, scopedState, type ReviseScope } from './scope.js';
import { processorTimes } from './settings.js';
import type { ProcessorState } from './state.js';

const HOUR = 3_600_000;
/** Default reach of the live re-derivation: lab results up to a day late. */
export const DEFAULT_REVISE_MAX_AGE_MS = 24 * HOUR;
/** Bound on the messages of the ring, whatever their rate. */
export const MAX_RING_MESSAGES = 200_000;
/** A snapshot of the state per this much event time. */
export const SNAPSHOT_EVERY_MS = HOUR;

/** Kinds whose late messages are re-derived: lab results, which legitimately arrive long after their time. */
const REVISING_KINDS: ReadonlySet<Kind> = new Set<Kind>(['sample']);

/** 53-bit FNV-1a of a string: the sent version of a record, compared with its re-derivation. */
function hash53(s: string): number {
  let h1 = 0x811c9dc5;
  let h2 = 0x01000193;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    h1 = Math.imul(h1 ^ c, 0x01000193);
    h2 = Math.imul(h2 ^ c, 0x5bd1e995);
  }
  return (h2 >>> 0) * 0x200000 + ((h1 >>> 0) & 0x1fffff);
}

const tOfKey = (key: string): number => Date.parse(key.split('|')[2] ?? '');

/**
 * The ring's messages in the order `reefd replay` gives them (services/replay/ordered.ts): a lab result
 * received more than the lateness after its time goes just before the first other message whose time is at
 * or after its own; every other message keeps its place.
 */
export function replayOrder(entries: readonly RingEntry[], latenessMs: number): RingEntry[] {
  const late: RingEntry[] = [];
  const rest: RingEntry[] = [];
  for (const e of entries) {
    const m = e.message;
    const isLate = m !== undefined && REVISING_KINDS.has(m.kind) && e.rxMs - e.tMs > latenessMs;
    (isLate ? late : rest).push(e);
  }
  if (late.length === 0) return rest;
  late.sort((a, b) => a.tMs - b.tMs || a.seq - b.seq);
  const out: RingEntry[] = [];
  let next = 0;
  for (const e of rest) {
    while (next < late.length && (late[next] as RingEntry).tMs <= e.tMs) out.push(late[next++] as RingEntry);
    out.push(e);
  }
  while (next < late.length) out.push(late[next++] as RingEntry);
  return out;
}

/** Sent versions of recent records: identity -> hash, pruned by the records' time. */
class SentTable {
  readonly #hash = new Map<string, number>();
  #queue: { tMs: number; key: string }[] = [];
  #head = 0;

  note(r: DerivedRecord): void {
    const key = recordKey(r);
    const { revision: _revision, ...body } = r as DerivedRecord & { revision?: number };
    if (!this.#hash.has(key)) this.#queue.push({ tMs: Date.parse(r.t), key });
    this.#hash.set(key, hash53(JSON.stringify(body)));
  }

  /** True when the record (without its revision) is the version sent. */
  same(r: DerivedRecord): boolean {
    return this.#hash.get(recordKey(r)) === hash53(JSON.stringify(r));
  }

  prune(cutMs: number): void {
    // Records come out close to time order; one out of order waits until the queue reaches it.
    while (this.#head < this.#queue.length && (this.#queue[this.#head] as { tMs: number }).tMs < cutMs) {
      this.#hash.delete((this.#queue[this.#head] as { key: string }).key);
      this.#head++;
    }
    if (this.#head > 4096 && this.#head * 2 > this.#queue.length) {
      this.#queue = this.#queue.slice(this.#head);
      this.#head = 0;
    }
  }
}

/** The part of the site a re-derivation replays, and a core of it started from a snapshot. */
export interface RevisePlan {
  scope: ReviseScope;
  scratch: (from: ProcessorState) => Core;
}

/** A processor without re-derivation: the core as it is. */
function plain(core: Core): Processor {
  return {
    push: (m, rxMs) => core.push(m, rxMs),
    drain: () => core.drain(),
    snapshot: (o) => core.snapshot(o),
    watermarkMs: () => core.watermarkMs(),
    counters: () => core.counters(),
    activeAlerts: () => core.activeAlerts(),
    sensorHealth: () => core.sensorHealth(),
  };
}

export function withRevisions(
  config: ReefdConfig,
  core: Core,
  options: ProcessorOptions,
  plan: RevisePlan | undefined,
): Processor {
  const reachMs = options.reviseMaxAgeMs ?? DEFAULT_REVISE_MAX_AGE_MS;
  // A site without bottle samplers (no scope) has nothing to re-derive and pays nothing.
  if (plan === undefined) return plain(core);
  // Off (reach 0): late samples are only counted.
  const enabled = reachMs > 0;
  const { scope, scratch: scratchOf } = plan;
  const state = core.state;
  const times = processorTimes(config);
  const samplesCarryTa = config.alkalinity.source === 'samples';
  const ring = new MessageRing({
    everyMs: SNAPSHOT_EVERY_MS,
    reachMs: reachMs + SNAPSHOT_EVERY_MS,
    maxMessages: MAX_RING_MESSAGES,
  });
  const sent = new SentTable();
  const inScope = (r: DerivedRecord): boolean => {
    const x = r as { station?: unknown; transect?: unknown };
    return r.type === 'flux' || r.type === 'daily'
      ? scope.transects.has(String(x.transect))
      : scope.stations.has(String(x.station));
  };

  /** Whether a late sample can have changed records already sent (a closed window, or TA carried). */
  const affectsSent = (tMs: number): boolean =>
    samplesCarryTa || (scope.transects.size > 0 && tMs < state.lastTickMs);

  function schedule(message: SensorMessage, rxMs: number): void {
    if (!affectsSent(message.tMs)) return;
    if (
      !enabled ||
      message.tMs < core.watermarkMs() - reachMs ||
      ring.snapshotBefore(message.tMs) === undefined
    ) {
      state.counters.lateSamplesNotRevised++;
      return;
    }
    state.reprocess.pending.push({ message, rxMs });
  }

  /** Rewinds to before the earliest pending sample and replays to the present; revised records go to out. */
  function revise(out: DerivedRecord[]): void {
    const pending = state.reprocess.pending;
    if (pending.length === 0) return;
    state.reprocess.pending = [];
    const earliest = pending.reduce((a, p) => Math.min(a, p.message.tMs), Infinity);
    const from = ring.snapshotBefore(earliest);
    if (from === undefined) {
      // After a restart the ring starts empty: these can no longer be re-derived live.
      state.counters.lateSamplesNotRevised += pending.length;
      return;
    }
    state.counters.lateSamplesRevised += pending.length;
    const scratch = scratchOf(from.state);
    const records: DerivedRecord[] = [];
    for (const e of replayOrder(ring.after(from), times.latenessMs)) {
      if (e.message !== undefined) records.push(...scratch.push(e.message, e.rxMs).records);
      else records.push(...scratch.advanceTo(e.eventMs));
    }
    const revisions = state.reprocess.revisions;
    for (const r of records) {
      if (r.type === 'alert' || sent.same(r)) continue;
      const key = recordKey(r);
      const revision = (revisions[key] ?? 0) + 1;
      revisions[key] = revision;
      const revised = { ...r, revision } as DerivedRecord;
      sent.note(revised);
      out.push(revised);
      state.counters.revisedRecords++;
    }
    const s = scratch.state;
    if (s.lastTickMs === state.lastTickMs && s.maxEventMs === state.maxEventMs) adoptScoped(state, s, scope);
    // Records before the oldest snapshot can no longer be re-derived.
    const cut = core.watermarkMs() - reachMs - 2 * SNAPSHOT_EVERY_MS;
    for (const key of Object.keys(revisions)) if (!(tOfKey(key) >= cut)) delete revisions[key];
  }

  function afterPush(m: SensorMessage, rxMs: number, records: readonly DerivedRecord[]): void {
    if (!enabled) return;
    const own = scope.stations.has(m.station);
    ring.add(own ? m : undefined, m.tMs, rxMs, kindModules[m.kind].completeMs(m as never));
    if (ring.due(state.maxEventMs)) {
      ring.snapshot(state.maxEventMs, scopedState(state, scope));
      // Records of the oldest snapshot's time, less the longest a record waits for its window to close.
      const wait = times.windowMs + times.windowDelayMs + times.latenessMs;
      sent.prune(state.maxEventMs - reachMs - 2 * SNAPSHOT_EVERY_MS - wait);
    }
    for (const r of records) if (r.type !== 'alert' && inScope(r)) sent.note(r);
  }

  return {
    ...plain(core),
    push(m, rxMs) {
      const out: DerivedRecord[] = [];
      if (!REVISING_KINDS.has(m.kind)) revise(out);
      const r = core.push(m, rxMs);
      if (r.status === 'ok') {
        afterPush(m, rxMs, r.records);
        if (r.late && REVISING_KINDS.has(m.kind)) schedule(m, rxMs);
      }
      if (out.length === 0) return r;
      return { ...r, records: [...out, ...r.records] };
    },
    drain() {
      const out: DerivedRecord[] = [];
      revise(out);
      out.push(...core.drain());
      return out;
    },
  };
}
