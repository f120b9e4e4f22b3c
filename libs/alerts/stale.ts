// The `stale` fault on event time (docs/contract-v1.md section 4: no message for 3 x the sensor's usual interval, at least 5 min),
// driven by a deadline heap (issue 17): each sensor has at most one live entry at the time its silence would pass
// the limit; advance() pops only the entries the watermark has passed, instead of walking and sorting every
// sensor. The per-sensor tracks are the snapshot; the heap is rebuilt from them on restore.
// Irregular kinds (bottle samples) are never stale (docs/methods/faults.md 12.5).

import {
  heapPeek,
  heapPop,
  heapPush,
  isIrregularKind,
  newDeadlineHeap,
  staleLimitMs,
  type DeadlineHeap,
} from '../qc/index.js';
import { trackMessage, type SensorTrack } from './faults.js';

export interface StaleSettings {
  readonly factor: number;
  readonly minMs: number;
}

/** The heap and the deadline each sensor holds in it (in memory only; rebuilt from the tracks). */
export interface StaleSchedule {
  heap: DeadlineHeap;
  scheduled: Map<string, number>;
}

export const newStaleSchedule = (): StaleSchedule => ({ heap: newDeadlineHeap(), scheduled: new Map() });

/** The kind of a metric `<kind or record type>.<field>`. */
export const kindOfMetric = (metric: string): string => metric.slice(0, Math.max(0, metric.indexOf('.')));

/** True when the metric's kind is irregular: its messages never feed the stale tracker. */
export const staleExempt = (metric: string): boolean => isIrregularKind(kindOfMetric(metric));

function schedule(s: StaleSchedule, key: string, tr: SensorTrack, cfg: StaleSettings): void {
  if (tr.stale !== null || !Number.isFinite(tr.lastMs)) return;
  const lim = staleLimitMs(tr, cfg.factor, cfg.minMs);
  if (lim === null) return;
  const due = tr.lastMs + lim;
  const cur = s.scheduled.get(key);
  // An earlier deadline needs its own entry; a later one is found when the current entry comes up.
  if (cur === undefined || due < cur) {
    s.scheduled.set(key, due);
    heapPush(s.heap, due, key);
  }
}

/**
 * A message of the sensor at tMs. Returns the episode it ends (raise time and the limit in force), if the sensor
 * was stale. Times not after the last one change nothing.
 */
export function staleMessage(
  s: StaleSchedule,
  tr: SensorTrack,
  key: string,
  tMs: number,
  cfg: StaleSettings,
): { raisedAtMs: number; limitMs: number; gapMs: number } | null {
  if (tMs <= tr.lastMs) return null;
  const ended =
    tr.stale === null
      ? null
      : { raisedAtMs: tr.stale.raisedAtMs, limitMs: tr.staleLimitMs ?? 0, gapMs: tMs - tr.lastMs };
  trackMessage(tr, tMs);
  tr.stale = null;
  tr.staleLimitMs = null;
  schedule(s, key, tr, cfg);
  return ended;
}

/**
 * Sensors whose silence passed their limit before `watermarkMs`, earliest deadline first (ties by key). Marks them
 * stale; returns each with its raise time (last message + limit) and the limit.
 */
export function staleDue(
  s: StaleSchedule,
  sensors: Record<string, SensorTrack>,
  watermarkMs: number,
  cfg: StaleSettings,
): { key: string; atMs: number; limitMs: number }[] {
  const out: { key: string; atMs: number; limitMs: number }[] = [];
  for (
    let top = heapPeek(s.heap);
    top !== undefined && top.deadlineMs < watermarkMs;
    top = heapPeek(s.heap)
  ) {
    heapPop(s.heap);
    if (s.scheduled.get(top.key) !== top.deadlineMs) continue; // superseded by an earlier deadline
    s.scheduled.delete(top.key);
    const tr = sensors[top.key];
    if (tr === undefined || tr.stale !== null) continue;
    const lim = staleLimitMs(tr, cfg.factor, cfg.minMs);
    if (lim === null) continue;
    if (watermarkMs - tr.lastMs > lim) {
      const atMs = tr.lastMs + lim; // event time at which the silence passed the limit, not the watermark's
      tr.stale = { raisedAtMs: atMs };
      tr.staleLimitMs = lim;
      out.push({ key: top.key, atMs, limitMs: lim });
    } else schedule(s, top.key, tr, cfg); // the sensor spoke since: its next deadline
  }
  return out;
}

/** Rebuilds the schedule from the tracks (after a restore). Sorted keys: the same heap whatever the key order. */
export function rebuildStale(sensors: Record<string, SensorTrack>, cfg: StaleSettings): StaleSchedule {
  const s = newStaleSchedule();
  for (const key of Object.keys(sensors).sort()) schedule(s, key, sensors[key] as SensorTrack, cfg);
  return s;
}
