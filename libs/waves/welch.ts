// Welch (1967), IEEE Trans. Audio Electroacoust. 15, 70-73: averaged modified periodograms, periodic Hann
// window, 50 % overlap, segment mean removed, one-sided density scaling (docs/methods/waves.md 4.2). Same definition as
// scipy.signal.welch(window='hann', noverlap=nperseg/2, detrend='constant', scaling='density'), which the
// reference vectors check to 1e-9 relative. DOF nu = 36 K^2/(19 K - 1) (Welch 1967 with the 50 % Hann
// overlap correlation 1/6, Harris 1978, Proc. IEEE 66, 51-83).
import { chi2Quantile } from './chi2.js';
import { planFor, realForward } from './fft.js';
import { WAVES_ERRORS } from './errors.js';

/** Welch estimate. psd in (unit of x)^2 Hz-1 at fHz[m] = m fs/nperseg, m = 0..nperseg/2. */
export interface WelchResult {
  readonly fHz: Float64Array;
  readonly psd: Float64Array;
  readonly dfHz: number;
  readonly nperseg: number;
  readonly nSegments: number;
  /** equivalent degrees of freedom per bin, 36 K^2/(19 K - 1) */
  readonly dof: number;
  /** 95 % confidence interval factors: S_true in [ciLower S, ciUpper S] (Jenkins & Watts 1968) */
  readonly ciLower: number;
  readonly ciUpper: number;
}

// Module state, as in fft.ts: one periodic Hann window per segment length, with its sum of squares.
// Data-independent, bounded, private; rebuilding it per burst would cost Ns cosines.
const windows = new Map<number, { w: Float64Array; sumSq: number }>();

/** Periodic Hann window w_n = 0.5 [1 - cos(2 pi n/Ns)] and sum w_n^2 (= 3 Ns/8 exactly for Ns >= 2). */
export function hannWindow(ns: number): { w: Float64Array; sumSq: number } {
  let h = windows.get(ns);
  if (h === undefined) {
    if (windows.size >= 32) windows.clear();
    const w = new Float64Array(ns);
    let s = 0;
    for (let i = 0; i < ns; i++) {
      const v = 0.5 * (1 - Math.cos((2 * Math.PI * i) / ns));
      w[i] = v;
      s += v * v;
    }
    h = { w, sumSq: s };
    windows.set(ns, h);
  }
  return h;
}

/**
 * Segment length for a burst of n samples at fsHz (docs/methods/waves.md 4.2): Ns = 2^round(log2(256 s x fs)), halved
 * until K = floor((N - Ns)/(Ns/2)) + 1 >= 3, never below 8. 256 s gives df ~ 0.004 Hz, fine enough to keep
 * the 0.005-0.04 Hz infragravity band; K >= 3 keeps nu >= 5.8.
 */
export function chooseSegmentLength(n: number, fsHz: number, targetS = 256): number {
  let ns = Math.pow(2, Math.max(3, Math.round(Math.log2(targetS * fsHz))));
  while (ns > 8 && segmentCount(n, ns) < 3) ns /= 2;
  return ns;
}

/** Number of 50 %-overlapping segments, K = floor((N - Ns)/(Ns/2)) + 1 (0 if N < Ns). */
export function segmentCount(n: number, ns: number): number {
  return n < ns ? 0 : Math.floor((n - ns) / (ns / 2)) + 1;
}

/** Welch (1967) DOF for K Hann segments at 50 % overlap; K = 1 gives 2. */
export function welchDof(k: number): number {
  return (36 * k * k) / (19 * k - 1);
}

/**
 * Windowed, mean-removed transform of x[off..off+ns) into spec (interleaved, bins 0..ns/2 valid).
 * seg is scratch of length ns.
 */
export function segmentTransform(
  x: Float64Array,
  off: number,
  ns: number,
  w: Float64Array,
  seg: Float64Array,
  spec: Float64Array,
): void {
  let mean = 0;
  for (let i = 0; i < ns; i++) mean += x[off + i] as number;
  mean /= ns;
  for (let i = 0; i < ns; i++) seg[i] = ((x[off + i] as number) - mean) * (w[i] as number);
  realForward(planFor(ns), seg, spec);
}

/**
 * Hot-path Welch: one-sided PSD of x[0..n) with segment length ns (power of two, 8 <= ns <= n) into
 * psd[0..ns/2]. Returns K. No allocation once the plan and window for ns exist.
 */
export function welchInto(x: Float64Array, n: number, fsHz: number, ns: number, psd: Float64Array): number {
  const k = segmentCount(n, ns);
  const { w, sumSq } = hannWindow(ns);
  const plan = planFor(ns);
  const seg = plan.b; // 2 ns long; fft.js reads only the first ns (no subarray view: no allocation)
  const spec = plan.a;
  const half = ns / 2;
  psd.fill(0, 0, half + 1);
  for (let j = 0; j < k; j++) {
    segmentTransform(x, j * half, ns, w, seg, spec);
    for (let m = 0; m <= half; m++) {
      const re = spec[2 * m] as number;
      const im = spec[2 * m + 1] as number;
      psd[m] = (psd[m] as number) + re * re + im * im;
    }
  }
  const scale = 2 / (fsHz * sumSq * k);
  for (let m = 0; m <= half; m++) psd[m] = (psd[m] as number) * scale;
  psd[0] = (psd[0] as number) * 0.5;
  psd[half] = (psd[half] as number) * 0.5;
  return k;
}

/**
 * Welch PSD of a signal x sampled at fsHz [Hz]. nperseg defaults to chooseSegmentLength(N, fs); it must be a
 * power of two (fft.js) between 8 and N. Units: psd in (unit of x)^2/Hz. The input is not detrended
 * beyond the per-segment mean (detrend it first if needed). Throws RangeError for an invalid size.
 */
export function welchPsd(x: ArrayLike<number>, fsHz: number, nperseg?: number): WelchResult {
  const n = x.length;
  const ns = nperseg ?? chooseSegmentLength(n, fsHz);
  if (!(fsHz > 0) || ns < 8 || ns > n || (ns & (ns - 1)) !== 0) {
    throw WAVES_ERRORS.error('REEFD_WAVES_WELCH_SIZE', `got fs=${fsHz}, nperseg=${ns}, N=${n}`);
  }
  const xs = x instanceof Float64Array ? x : Float64Array.from(x);
  const psd = new Float64Array(ns / 2 + 1);
  const k = welchInto(xs, n, fsHz, ns, psd);
  const fHz = new Float64Array(ns / 2 + 1);
  for (let m = 0; m <= ns / 2; m++) fHz[m] = (m * fsHz) / ns;
  const dof = welchDof(k);
  return {
    fHz,
    psd,
    dfHz: fsHz / ns,
    nperseg: ns,
    nSegments: k,
    dof,
    ciLower: dof / chi2Quantile(0.975, dof),
    ciUpper: dof / chi2Quantile(0.025, dof),
  };
}
