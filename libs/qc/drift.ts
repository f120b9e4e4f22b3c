// Drift between two co-located sensors of one kind (docs/methods/faults.md 12.4). Two sensors in the same water
// differ by a constant offset (calibration) plus noise; one that fouls or ages makes the difference walk. The test
// pairs each sample of A with the nearest sample of B, takes hourly medians of B - A, fits a Theil-Sen line and
// judges the change of the difference over the span against limits and against the line's own uncertainty.
// A constant offset is not drift and is only reported. Engineering defaults, not published values.

import type { QcFlag } from './flags.js';
import { madSd, median, theilSen } from './robust.js';

export interface TimeSeries {
  /** Sample times, ms, increasing. */
  readonly tMs: ArrayLike<number>;
  /** Values, same length (non-finite values are skipped). */
  readonly v: ArrayLike<number>;
}

export interface DriftLimits {
  /** |change of B - A over the span| above this gives 3 (variable's unit). */
  readonly suspect: number;
  /** ... above this gives 4. */
  readonly fail: number;
  /** Shortest span judged, ms (default 23 h: a day's cycle is in it, and a day of 5-min samples spans 23 h 55). */
  readonly minSpanMs: number;
  /** Samples of A and B further apart than this are not paired, ms. */
  readonly maxPairGapMs: number;
  /** Bin of the medians, ms (default 1 h). */
  readonly binMs: number;
  /** Fewest bins judged. */
  readonly minBins: number;
}

const HOUR_MS = 3_600_000;
const lim = (suspect: number, fail: number): DriftLimits => ({
  suspect,
  fail,
  minSpanMs: 23 * HOUR_MS,
  maxPairGapMs: 10 * 60_000,
  binMs: HOUR_MS,
  minBins: 12,
});

/**
 * Defaults per contract field (engineering defaults from the accuracies of docs/methods/uncertainty.md 9.3: a few
 * times what two healthy sensors of the kind may differ by over days).
 */
export const DEFAULT_DRIFT_LIMITS: Readonly<Record<string, DriftLimits>> = Object.freeze({
  temp_c: lim(0.02, 0.05),
  sal: lim(0.02, 0.05),
  o2_umol_kg: lim(4, 8),
  o2_umol_l: lim(4, 8),
  o2_mg_l: lim(0.13, 0.26),
  pco2_uatm: lim(8, 15),
  depth_m: lim(0.01, 0.03),
  baro_hpa: lim(0.5, 1),
});

export interface DriftResult {
  /** 1 no drift, 3 suspect, 4 fail, 2 not evaluated (too few pairs or too short a span). */
  readonly flag: QcFlag;
  /** Samples paired. */
  readonly pairs: number;
  /** Span of the paired samples, ms. */
  readonly spanMs: number;
  /** Median of B - A over the span (the calibration offset, not judged). */
  readonly offset: number;
  /** Slope of B - A, unit per day, and its standard error. */
  readonly slopePerDay: number;
  readonly slopeSePerDay: number;
  /** Change of B - A over the span from the fitted line (what is judged). */
  readonly change: number;
}

const DAY_MS = 86_400_000;

function pairDifferences(a: TimeSeries, b: TimeSeries, maxGapMs: number): { t: number[]; d: number[] } {
  const t: number[] = [];
  const d: number[] = [];
  let j = 0;
  for (let i = 0; i < a.tMs.length; i++) {
    const ta = a.tMs[i] as number;
    const va = a.v[i] as number;
    if (!Number.isFinite(va)) continue;
    while (
      j + 1 < b.tMs.length &&
      Math.abs((b.tMs[j + 1] as number) - ta) <= Math.abs((b.tMs[j] as number) - ta)
    )
      j++;
    const tb = b.tMs[j];
    const vb = b.v[j];
    if (tb === undefined || vb === undefined || !Number.isFinite(vb) || Math.abs(tb - ta) > maxGapMs)
      continue;
    t.push(ta);
    d.push(vb - va);
  }
  return { t, d };
}

/** Drift of B against A over the whole of the series given (the caller chooses the span, e.g. the last 3 days). */
export function coLocatedDrift(a: TimeSeries, b: TimeSeries, limits: DriftLimits): DriftResult {
  const { t, d } = pairDifferences(a, b, limits.maxPairGapMs);
  const spanMs = t.length > 1 ? (t[t.length - 1] as number) - (t[0] as number) : 0;
  const none = (offset: number): DriftResult => ({
    flag: 2,
    pairs: t.length,
    spanMs,
    offset,
    slopePerDay: Number.NaN,
    slopeSePerDay: Number.NaN,
    change: Number.NaN,
  });
  if (t.length < 2) return none(Number.NaN);
  const offset = median(d);
  // Hourly medians: a spike of either sensor and the serial noise within an hour count once.
  const bx: number[] = [];
  const by: number[] = [];
  let start = 0;
  for (let i = 1; i <= t.length; i++) {
    const k0 = Math.floor((t[start] as number) / limits.binMs);
    if (i < t.length && Math.floor((t[i] as number) / limits.binMs) === k0) continue;
    bx.push(((k0 + 0.5) * limits.binMs - (t[0] as number)) / DAY_MS);
    by.push(median(d.slice(start, i)));
    start = i;
  }
  if (spanMs < limits.minSpanMs || bx.length < limits.minBins) return none(offset);
  const line = theilSen(bx, by);
  const resid = by.map((y, i) => y - (line.intercept + line.slope * (bx[i] as number)));
  const xm = bx.reduce((s, x) => s + x, 0) / bx.length;
  const sxx = bx.reduce((s, x) => s + (x - xm) ** 2, 0);
  // The ordinary least-squares standard error with a robust residual sd (an approximation for Theil-Sen, whose
  // efficiency on normal errors is close to that of least squares; from memory: verify).
  const se = madSd(resid) / Math.sqrt(sxx);
  const spanDays = spanMs / DAY_MS;
  const change = line.slope * spanDays;
  const resolved = Math.abs(change) > 3 * se * spanDays;
  const flag: QcFlag =
    resolved && Math.abs(change) > limits.fail ? 4 : resolved && Math.abs(change) > limits.suspect ? 3 : 1;
  return { flag, pairs: t.length, spanMs, offset, slopePerDay: line.slope, slopeSePerDay: se, change };
}
