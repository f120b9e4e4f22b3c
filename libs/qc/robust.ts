// Robust statistics for the trend tests (docs/methods/faults.md 12.4): median, median absolute deviation and the
// Theil-Sen line (Theil 1950, Proc. K. Ned. Akad. Wet.; Sen 1968, J. Am. Stat. Assoc.: the median of the slopes
// of all pairs of points; from memory: verify). A few wild points move none of them much.

/** Median of the finite values (NaN when none). Copies: the input is left as it was. */
export function median(xs: ArrayLike<number>): number {
  const a: number[] = [];
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i] as number;
    if (Number.isFinite(x)) a.push(x);
  }
  if (a.length === 0) return Number.NaN;
  a.sort((p, q) => p - q);
  const m = a.length >> 1;
  return a.length % 2 === 1 ? (a[m] as number) : ((a[m - 1] as number) + (a[m] as number)) / 2;
}

/** Median absolute deviation scaled to a normal sd (x 1.4826, common practice). */
export function madSd(xs: ArrayLike<number>): number {
  const m = median(xs);
  const d: number[] = [];
  for (let i = 0; i < xs.length; i++) d.push(Math.abs((xs[i] as number) - m));
  return 1.4826 * median(d);
}

export interface Line {
  /** Slope, y units per x unit. */
  readonly slope: number;
  /** Value at x = 0. */
  readonly intercept: number;
}

/**
 * Theil-Sen line through (x, y). Check: y = 2x + 1 with one wild point still gives slope 2 (hand-computed in the
 * test). O(n^2): give it at most a few hundred points (the callers pass bin means or medians).
 */
export function theilSen(x: ArrayLike<number>, y: ArrayLike<number>): Line {
  const slopes: number[] = [];
  for (let i = 0; i < x.length; i++) {
    for (let j = i + 1; j < x.length; j++) {
      const dx = (x[j] as number) - (x[i] as number);
      if (dx !== 0) slopes.push(((y[j] as number) - (y[i] as number)) / dx);
    }
  }
  const slope = slopes.length === 0 ? Number.NaN : median(slopes);
  const r: number[] = [];
  for (let i = 0; i < x.length; i++) r.push((y[i] as number) - slope * (x[i] as number));
  return { slope, intercept: median(r) };
}
