// Linear surface reconstruction from bottom pressure and zero-upcrossing wave statistics (docs/methods/waves.md 4.5):
// eta = IDFT[ DFT(head)/Kp(f) ] inside the analysis band, 0 outside (linear transfer function, e.g.
// Bishop & Donelan 1987, Coastal Eng. 11; Jones & Monismith 2007, Limnol. Oceanogr. Methods 5). Zero-upcrossing
// heights and periods after IAHR (1989): H1/3, H1/10, Hmax, Tz.
import { selectKth } from './prep.js';
import { complexDft, isPowerOfTwo, planFor, realForward, realForwardEven, realInverse } from './fft.js';

/** Scratch for one burst length n; reused across bursts of the same length (see analyze.ts). */
export interface ReconWork {
  readonly n: number;
  readonly cplx: Float64Array; // 2n
  readonly spec: Float64Array; // 2n
}

export function makeReconWork(n: number): ReconWork {
  return { n, cplx: new Float64Array(2 * n), spec: new Float64Array(2 * n) };
}

/**
 * Surface elevation eta [m] from the detrended head x [m] (length n, no window): bins mLo..mHi of the exact
 * N-point DFT (f_m = m fs/n) are divided by kp[m] = Kp(f_m), all other bins set to 0 (mHi <= n/2). Even n uses
 * half-length complex transforms (fft.js directly for powers of two, Bluestein of size n/2 otherwise); odd n
 * a full-length Bluestein transform. Writes eta into out.
 */
export function reconstructSurface(
  x: Float64Array,
  kp: Float64Array,
  mLo: number,
  mHi: number,
  work: ReconWork,
  out: Float64Array,
): void {
  const n = work.n;
  const { cplx, spec } = work;
  const even = n % 2 === 0 && n >= 4;
  if (even && isPowerOfTwo(n)) realForward(planFor(n), x, spec);
  else if (even) realForwardEven(x, n, spec, cplx);
  else {
    for (let i = 0; i < n; i++) {
      cplx[2 * i] = x[i] as number;
      cplx[2 * i + 1] = 0;
    }
    complexDft(cplx, spec, n, false);
  }
  // Hermitian spectrum: bins mLo..mHi scaled (their mirrors n - m conjugate in the full-length case).
  cplx.fill(0, 0, even ? n + 2 : 2 * n);
  for (let m = mLo; m <= mHi; m++) {
    const gain = 1 / (kp[m] as number);
    const re = (spec[2 * m] as number) * gain;
    const im = (spec[2 * m + 1] as number) * gain;
    cplx[2 * m] = re;
    cplx[2 * m + 1] = im;
    if (!even && m !== n - m) {
      cplx[2 * (n - m)] = re;
      cplx[2 * (n - m) + 1] = -im;
    }
  }
  if (even) {
    realInverse(cplx, out, n, spec);
    return;
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
  // The c highest waves by selection rather than a sort: after selectKth(.., nw - c) the c largest heights
  // sit at the top of the array (in no particular order), which is all a mean of them needs.
  const c3 = Math.floor(nw / 3);
  const c10 = Math.floor(nw / 10);
  let hmax = 0;
  for (let i = 0; i < nw; i++) if ((heights[i] as number) > hmax) hmax = heights[i] as number;
  const meanTop = (count: number): number | null => {
    if (count === 0) return null;
    let s = 0;
    for (let i = nw - count; i < nw; i++) s += heights[i] as number;
    return s / count;
  };
  if (c3 > 0) selectKth(heights, nw - c3, 0, nw - 1);
  const h13 = meanTop(c3);
  if (c10 > 0) selectKth(heights, nw - c10, nw - c3, nw - 1);
  const h110 = meanTop(c10);
  return {
    nWaves: nw,
    h13M: h13,
    h110M: h110,
    hmaxM: hmax,
    tzS: (tPrev - tFirst) / nw / fsHz,
  };
}
