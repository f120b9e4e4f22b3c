// Linear surface reconstruction from bottom pressure and zero-upcrossing wave statistics (science.md 4.5):
// eta = IDFT[ DFT(head)/Kp(f) ] inside the analysis band, 0 outside (linear transfer function, e.g.
// Bishop & Donelan 1987, Coastal Eng. 11; Jones & Monismith 2007, Limnol. Oceanogr. Methods 5). Zero-upcrossing
// heights and periods after IAHR (1989): H1/3, H1/10, Hmax, Tz.
import { solveDispersionRow, pressureResponse } from './dispersion.js';
import { complexDft, isPowerOfTwo, planFor, realForward } from './fft.js';

/** Scratch for one burst length n; reused across bursts of the same length (see analyze.ts). */
export interface ReconWork {
  readonly n: number;
  readonly cplx: Float64Array; // 2n
  readonly spec: Float64Array; // 2n
  readonly omega: Float64Array; // n/2 + 1
  readonly k: Float64Array; // n/2 + 1
}

export function makeReconWork(n: number): ReconWork {
  const half = (n >> 1) + 1;
  return {
    n,
    cplx: new Float64Array(2 * n),
    spec: new Float64Array(2 * n),
    omega: new Float64Array(half),
    k: new Float64Array(half),
  };
}

/**
 * Surface elevation eta [m] from the detrended head x [m] (length n, no window): bins with fLo <= f_m <= fHi
 * are divided by Kp(f_m) = cosh(k z)/cosh(k h), all others set to 0; the exact N-point DFT is used for any n.
 * Writes eta into out (length n).
 */
export function reconstructSurface(
  x: Float64Array,
  fsHz: number,
  depthM: number,
  sensorHeightM: number,
  g: number,
  fLoHz: number,
  fHiHz: number,
  work: ReconWork,
  out: Float64Array,
): void {
  const n = work.n;
  const { cplx, spec, omega, k } = work;
  const df = fsHz / n;
  const eps = 1e-9 * df;
  const mLo = Math.max(1, Math.ceil((fLoHz - eps) / df));
  const mHi = Math.min(n >> 1, Math.floor((fHiHz + eps) / df));
  if (isPowerOfTwo(n)) {
    realForward(planFor(n), x, spec);
  } else {
    for (let i = 0; i < n; i++) {
      cplx[2 * i] = x[i] as number;
      cplx[2 * i + 1] = 0;
    }
    complexDft(cplx, spec, n, false);
  }
  const count = mHi >= mLo ? mHi - mLo + 1 : 0;
  for (let j = 0; j < count; j++) omega[j] = 2 * Math.PI * (mLo + j) * df;
  solveDispersionRow(omega, depthM, g, k, count);
  // Hermitian spectrum: bins mLo..mHi scaled, their mirrors n - m conjugate; everything else zero.
  cplx.fill(0);
  for (let j = 0; j < count; j++) {
    const m = mLo + j;
    const gain = 1 / pressureResponse(k[j] as number, sensorHeightM, depthM);
    const re = (spec[2 * m] as number) * gain;
    const im = (spec[2 * m + 1] as number) * gain;
    cplx[2 * m] = re;
    cplx[2 * m + 1] = im;
    if (m !== n - m) {
      cplx[2 * (n - m)] = re;
      cplx[2 * (n - m) + 1] = -im;
    }
  }
  complexDft(cplx, spec, n, true);
  for (let i = 0; i < n; i++) out[i] = spec[2 * i] as number;
}

export interface ZeroCrossingStats {
  readonly nWaves: number;
  readonly h13M: number | null;
  readonly h110M: number | null;
  readonly hmaxM: number | null;
  readonly tzS: number | null;
}

/**
 * Zero-upcrossing analysis of eta[0..n) at fsHz. An upcrossing lies between samples i and i+1 when
 * eta[i] < 0 <= eta[i+1]; its time is interpolated linearly. Each wave spans two consecutive upcrossings;
 * height = max - min of the samples between them, period = their spacing. heights is scratch (length >= n/2).
 * H1/3 (H1/10) is the mean of the floor(N/3) (floor(N/10)) highest waves, null if that count is 0.
 */
export function zeroCrossingStats(
  eta: Float64Array,
  n: number,
  fsHz: number,
  heights: Float64Array,
): ZeroCrossingStats {
  let nw = 0;
  let first = -1;
  let tPrev = 0;
  let tFirst = 0;
  let hi = -Infinity;
  let lo = Infinity;
  for (let i = 0; i + 1 < n; i++) {
    const a = eta[i] as number;
    const b = eta[i + 1] as number;
    if (a < 0 && b >= 0) {
      const t = i + a / (a - b);
      if (first < 0) {
        first = i;
        tFirst = t;
      } else {
        heights[nw++] = hi - lo;
      }
      tPrev = t;
      hi = -Infinity;
      lo = Infinity;
    }
    if (first >= 0) {
      if (b > hi) hi = b;
      if (b < lo) lo = b;
    }
  }
  if (nw === 0) return { nWaves: 0, h13M: null, h110M: null, hmaxM: null, tzS: null };
  const hs = heights.subarray(0, nw);
  hs.sort();
  const meanTop = (count: number): number | null => {
    if (count === 0) return null;
    let s = 0;
    for (let i = nw - count; i < nw; i++) s += hs[i] as number;
    return s / count;
  };
  return {
    nWaves: nw,
    h13M: meanTop(Math.floor(nw / 3)),
    h110M: meanTop(Math.floor(nw / 10)),
    hmaxM: hs[nw - 1] as number,
    tzS: (tPrev - tFirst) / nw / fsHz,
  };
}
