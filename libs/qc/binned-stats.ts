// Bounded sliding-window statistics over event time: the window is cut into fixed time bins, each holding count,
// mean, M2 (Welford), min, max and its first sample time. Bins merge with the parallel update of
// Chan, Golub & LeVeque (1979, "Updating formulae and a pairwise algorithm for computing sample variances";
// from memory: verify). Memory is fixed (nBins + 1 slots) whatever the sample rate; the price is that the window
// edge is resolved to one bin (windowMs / nBins), which is documented at each test that uses it.
// Plain number arrays, not typed arrays, and null for "empty": the state must survive a JSON round trip (the
// processor snapshots it), and typed arrays or NaN do not.

export interface WindowSummary {
  n: number;
  mean: number;
  /** Sample standard deviation (n - 1); NaN when n < 2. */
  sd: number;
  min: number;
  max: number;
  /** Earliest sample time (ms) in the bins included. Infinity when empty. */
  firstMs: number;
}

export interface BinnedStats {
  readonly binMs: number;
  readonly slots: number;
  /** Bin index held by each slot (null when empty). */
  readonly key: (number | null)[];
  readonly n: number[];
  readonly mean: number[];
  readonly m2: number[];
  readonly min: number[];
  readonly max: number[];
  readonly first: number[];
}

/** A window of `windowMs` resolved into `nBins` bins (default 64). */
export function createBinnedStats(windowMs: number, nBins = 64): BinnedStats {
  if (!(windowMs > 0) || !Number.isInteger(nBins) || nBins < 1) {
    throw new RangeError(
      `REEFD_QC_BAD_WINDOW: window ${windowMs} ms / ${nBins} bins; give a window > 0 and bins >= 1`,
    );
  }
  const slots = nBins + 1;
  return {
    binMs: windowMs / nBins,
    slots,
    key: new Array<number | null>(slots).fill(null),
    n: new Array<number>(slots).fill(0),
    mean: new Array<number>(slots).fill(0),
    m2: new Array<number>(slots).fill(0),
    min: new Array<number>(slots).fill(0),
    max: new Array<number>(slots).fill(0),
    first: new Array<number>(slots).fill(0),
  };
}

/** Adds one sample; times must not decrease (the QC state drops out-of-order samples before this). */
export function binnedAdd(s: BinnedStats, tMs: number, v: number): void {
  const k = Math.floor(tMs / s.binMs);
  const i = ((k % s.slots) + s.slots) % s.slots;
  if (s.key[i] !== k) {
    s.key[i] = k;
    s.n[i] = 1;
    s.mean[i] = v;
    s.m2[i] = 0;
    s.min[i] = v;
    s.max[i] = v;
    s.first[i] = tMs;
    return;
  }
  const n = (s.n[i] ?? 0) + 1;
  const mean = s.mean[i] ?? 0;
  const d = v - mean;
  const newMean = mean + d / n;
  s.n[i] = n;
  s.mean[i] = newMean;
  s.m2[i] = (s.m2[i] ?? 0) + d * (v - newMean);
  if (v < (s.min[i] ?? v)) s.min[i] = v;
  if (v > (s.max[i] ?? v)) s.max[i] = v;
}

/** Summary of every bin that overlaps [fromMs, toMs]. */
export function binnedSummary(s: BinnedStats, fromMs: number, toMs: number): WindowSummary {
  const k0 = Math.floor(fromMs / s.binMs);
  const k1 = Math.floor(toMs / s.binMs);
  let n = 0;
  let mean = 0;
  let m2 = 0;
  let min = Infinity;
  let max = -Infinity;
  let firstMs = Infinity;
  for (let i = 0; i < s.slots; i++) {
    const k = s.key[i];
    if (k === null || k === undefined || k < k0 || k > k1) continue;
    const nb = s.n[i] ?? 0;
    if (nb === 0) continue;
    const mb = s.mean[i] ?? 0;
    const nt = n + nb;
    const d = mb - mean;
    mean += (d * nb) / nt;
    m2 += (s.m2[i] ?? 0) + (d * d * n * nb) / nt;
    n = nt;
    min = Math.min(min, s.min[i] ?? Infinity);
    max = Math.max(max, s.max[i] ?? -Infinity);
    firstMs = Math.min(firstMs, s.first[i] ?? Infinity);
  }
  return { n, mean, sd: n >= 2 ? Math.sqrt(Math.max(0, m2 / (n - 1))) : Number.NaN, min, max, firstMs };
}
