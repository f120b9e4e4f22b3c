// A sensor's usual reporting interval and its stale limit (docs/methods/qc.md 7.2 test 1; contract: no message for
// 3 x the usual interval, at least 5 min, raises `stale`). Irregular kinds (bottle samples, sent when a campaign
// happens) have no usual interval and are never stale (docs/methods/faults.md 12.5). Plain JSON data.

/** Kinds whose messages come at no regular interval: exempt from every timing-based check. */
export const IRREGULAR_KINDS: readonly string[] = Object.freeze(['sample']);

export const isIrregularKind = (kind: string): boolean => IRREGULAR_KINDS.includes(kind);

export interface Cadence {
  /** Last message time, ms; null before the first. */
  lastMs: number | null;
  /** The last intervals between messages, ms (at most INTERVALS_KEPT). */
  intervals: number[];
}

export const INTERVALS_KEPT = 15;

export const newCadence = (): Cadence => ({ lastMs: null, intervals: [] });

/** Median of the kept intervals: the sensor's usual interval, robust to the odd gap or burst. */
export function usualIntervalMs(c: { intervals: readonly number[] }): number | null {
  const xs = [...c.intervals].sort((a, b) => a - b);
  if (xs.length === 0) return null;
  const m = xs.length >> 1;
  return xs.length % 2 === 1 ? (xs[m] as number) : ((xs[m - 1] as number) + (xs[m] as number)) / 2;
}

/** Stale limit: factor x the usual interval, at least minMs (contract: 3 x, at least 5 min). */
export function staleLimitMs(
  c: { intervals: readonly number[] },
  factor: number,
  minMs: number,
): number | null {
  const u = usualIntervalMs(c);
  return u === null ? null : Math.max(factor * u, minMs);
}

/**
 * Records a message time. `learn` false keeps the interval out of the usual-interval estimate (the silence that
 * ends a stale episode is an outage, not the cadence). Returns false for a time not after the last one.
 */
export function cadenceAdd(c: Cadence, tMs: number, learn = true): boolean {
  if (c.lastMs !== null && tMs <= c.lastMs) return false;
  if (learn && c.lastMs !== null) {
    c.intervals.push(tMs - c.lastMs);
    if (c.intervals.length > INTERVALS_KEPT) c.intervals.shift();
  }
  c.lastMs = tMs;
  return true;
}
