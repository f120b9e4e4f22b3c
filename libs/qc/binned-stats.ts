// Bounded sliding-window statistics over event time: the window is cut into fixed time bins and only the bins
// that hold a sample are stored, oldest first, in one flat number array (stride 5: bin index, first sample time,
// count, and two summary numbers). Two flavours, each holding only what its tests read (issue 17: QC state sized to
// its use):
// - 'moments': count, mean and M2 (Welford), merged across bins with the parallel update of Chan, Golub & LeVeque
//   (1979, "Updating formulae and a pairwise algorithm for computing sample variances"; from memory: verify);
// - 'extremes': count, min and max.
// Memory is at most (nBins + 1) x 5 numbers whatever the sample rate, and fewer when samples are sparser than the
// bins; the price is that the window edge is resolved to one bin (windowMs / nBins), which is documented at each
// test that uses it. Plain number arrays (no typed arrays, no NaN): the state survives a JSON round trip.
import { QC_ERRORS } from './errors.js';

export interface WindowSummary {
  n: number;
  /** Mean ('moments' only; NaN otherwise or when empty). */
  mean: number;
  /** Sample standard deviation (n - 1; 'moments' only); NaN when n < 2. */
  sd: number;
  /** Extremes ('extremes' only; +-Infinity otherwise or when empty). */
  min: number;
  max: number;
  /** Earliest sample time (ms) in the bins included. Infinity when empty. */
  firstMs: number;
}

export type BinnedMode = 'moments' | 'extremes';

export interface BinnedStats {
  readonly mode: BinnedMode;
  readonly binMs: number;
  readonly nBins: number;
  /** Live bins, oldest first: [k, firstMs, n, a, b] per bin (moments: a = mean, b = M2; extremes: min, max). */
  readonly b: number[];
}

const STRIDE = 5;

/** A window of `windowMs` resolved into `nBins` bins. */
export function createBinnedStats(windowMs: number, nBins: number, mode: BinnedMode): BinnedStats {
  if (!(windowMs > 0) || !Number.isInteger(nBins) || nBins < 1) {
    throw QC_ERRORS.error(
      'REEFD_QC_BAD_WINDOW',
      `window ${windowMs} ms / ${nBins} bins; give a window > 0 and bins >= 1`,
    );
  }
  return { mode, binMs: windowMs / nBins, nBins, b: [] };
}

/** Adds one sample; times must not decrease (the QC state drops out-of-order samples before this). */
export function binnedAdd(s: BinnedStats, tMs: number, v: number): void {
  const k = Math.floor(tMs / s.binMs);
  const b = s.b;
  const last = b.length - STRIDE;
  if (last >= 0 && b[last] === k) {
    const n = (b[last + 2] as number) + 1;
    b[last + 2] = n;
    if (s.mode === 'moments') {
      const mean = b[last + 3] as number;
      const d = v - mean;
      const newMean = mean + d / n;
      b[last + 3] = newMean;
      b[last + 4] = (b[last + 4] as number) + d * (v - newMean);
    } else {
      if (v < (b[last + 3] as number)) b[last + 3] = v;
      if (v > (b[last + 4] as number)) b[last + 4] = v;
    }
    return;
  }
  if (s.mode === 'moments') b.push(k, tMs, 1, v, 0);
  else b.push(k, tMs, 1, v, v);
  // Drop the bins that fell out of the longest span a summary can ask for (nBins + 1 bins).
  let drop = 0;
  while (drop < b.length && (b[drop] as number) < k - s.nBins) drop += STRIDE;
  if (drop > 0) b.splice(0, drop);
}

/** Summary of every stored bin that overlaps [fromMs, toMs]. */
export function binnedSummary(s: BinnedStats, fromMs: number, toMs: number): WindowSummary {
  const k0 = Math.floor(fromMs / s.binMs);
  const k1 = Math.floor(toMs / s.binMs);
  const b = s.b;
  let n = 0;
  let mean = 0;
  let m2 = 0;
  let min = Infinity;
  let max = -Infinity;
  let firstMs = Infinity;
  for (let i = 0; i < b.length; i += STRIDE) {
    const k = b[i] as number;
    if (k < k0 || k > k1) continue;
    const nb = b[i + 2] as number;
    const first = b[i + 1] as number;
    if (first < firstMs) firstMs = first;
    if (s.mode === 'moments') {
      const mb = b[i + 3] as number;
      const nt = n + nb;
      const d = mb - mean;
      mean += (d * nb) / nt;
      m2 += (b[i + 4] as number) + (d * d * n * nb) / nt;
      n = nt;
    } else {
      n += nb;
      if ((b[i + 3] as number) < min) min = b[i + 3] as number;
      if ((b[i + 4] as number) > max) max = b[i + 4] as number;
    }
  }
  const moments = s.mode === 'moments';
  return {
    n,
    mean: moments && n > 0 ? mean : Number.NaN,
    sd: moments && n >= 2 ? Math.sqrt(Math.max(0, m2 / (n - 1))) : Number.NaN,
    min,
    max,
    firstMs,
  };
}

/** Number of bins held (for memory tests and benchmarks). */
export const binnedSize = (s: BinnedStats): number => s.b.length / STRIDE;
