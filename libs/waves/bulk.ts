// Pressure-response cutoff and spectral bulk statistics (docs/methods/waves.md 4.3-4.4). Names after IAHR (1989),
// J. Waterw. Port Coastal Ocean Eng. 115: Hm0 = 4 sqrt(m0), Tm01 = m0/m1, Tm02 = sqrt(m0/m2),
// Hrms = sqrt(8 m0) (Rayleigh), Tp with parabolic peak refinement; sampling error after
// Satterthwaite (1946), Biometrics Bull. 2, 110-114.
import { pressureResponse } from './dispersion.js';

export type CutoffReason = 'max' | 'nyquist' | 'kp';

/**
 * Upper frequency limit fmax = min(maxFreqHz, fs/2, f*) [Hz], with f* the frequency where
 * Kp^2 = cosh^2(k z)/cosh^2(k h) falls to minKp2 (Kp decreases monotonically with f for z < h). f* is
 * found by bisection in k on the bracket [ln(1/r), ln(2/r)]/(h - z), r = sqrt(minKp2), which holds because
 * e^-k(h-z) <= Kp <= 2 e^-k(h-z); then omega* = sqrt(g k tanh(k h)). Check: h = 2 m, z = 0.5 m, minKp2 = 0.1,
 * g = 9.80665 gives k* = 0.968389 rad/m, f* = 0.480372 Hz (scipy.optimize.brentq on Kp^2 - 0.1).
 */
export function cutoffFrequency(
  depthM: number,
  sensorHeightM: number,
  fsHz: number,
  maxFreqHz: number,
  minKp2: number,
  g: number,
): { fHz: number; by: CutoffReason } {
  let f = maxFreqHz;
  let by: CutoffReason = 'max';
  if (fsHz / 2 < f) {
    f = fsHz / 2;
    by = 'nyquist';
  }
  const gap = depthM - sensorHeightM;
  if (gap > 0 && minKp2 > 0 && minKp2 < 1) {
    const r = Math.sqrt(minKp2);
    let lo = Math.log(1 / r) / gap;
    let hi = Math.log(2 / r) / gap;
    for (let i = 0; i < 200 && hi - lo > 1e-13 * hi; i++) {
      const mid = 0.5 * (lo + hi);
      if (pressureResponse(mid, sensorHeightM, depthM) > r) lo = mid;
      else hi = mid;
    }
    const k = 0.5 * (lo + hi);
    const fStar = Math.sqrt(g * k * Math.tanh(k * depthM)) / (2 * Math.PI);
    if (fStar < f) {
      f = fStar;
      by = 'kp';
    }
  }
  return { fHz: f, by };
}

export interface SpectralStats {
  readonly m0: number;
  readonly hm0M: number;
  readonly hm0SsM: number;
  readonly hm0IgM: number | null;
  readonly tpS: number;
  readonly tm01S: number;
  readonly tm02S: number;
  readonly hrmsM: number;
  readonly hm0SigmaM: number;
  /** Satterthwaite effective DOF of m0 */
  readonly nuEff: number;
  /** number of bins in the total band */
  readonly nBins: number;
}

/**
 * Bulk statistics of a surface-elevation spectrum sEta [m^2/Hz] on the grid f_m = m df, m = 0..last, with
 * nu DOF per bin. Bands by bin centre: IG [igLow, split), SS [split, fmax], total [igLow, fmax], or total =
 * SS when evaluateIg is false. Returns null when the total band holds no bin or no energy.
 */
export function spectralStats(
  sEta: Float64Array,
  dfHz: number,
  fmaxHz: number,
  igLowHz: number,
  splitHz: number,
  evaluateIg: boolean,
  nu: number,
): SpectralStats | null {
  const lowHz = evaluateIg ? igLowHz : splitHz;
  // a relative epsilon keeps a bin that sits exactly on an edge in the band it names
  const eps = 1e-9 * dfHz;
  const mLo = Math.max(1, Math.ceil((lowHz - eps) / dfHz));
  const mHi = Math.min(sEta.length - 1, Math.floor((fmaxHz + eps) / dfHz));
  if (mHi < mLo) return null;
  let m0 = 0,
    m1 = 0,
    m2 = 0,
    mIg = 0,
    sumSq = 0,
    peak = mLo;
  for (let m = mLo; m <= mHi; m++) {
    const f = m * dfHz;
    const s = sEta[m] as number;
    m0 += s;
    m1 += f * s;
    m2 += f * f * s;
    sumSq += s * s;
    if (f < splitHz - eps) mIg += s;
    if (s > (sEta[peak] as number)) peak = m;
  }
  if (!(m0 > 0)) return null;
  const sumS = m0;
  m0 *= dfHz;
  m1 *= dfHz;
  m2 *= dfHz;
  mIg *= dfHz;
  let fp = peak * dfHz;
  if (peak > mLo && peak < mHi) {
    const a = sEta[peak - 1] as number;
    const b = sEta[peak] as number;
    const c = sEta[peak + 1] as number;
    const den = a - 2 * b + c;
    if (den < 0) fp += (dfHz * 0.5 * (a - c)) / den;
  }
  const nuEff = (nu * sumS * sumS) / sumSq;
  const hm0 = 4 * Math.sqrt(m0);
  return {
    m0,
    hm0M: hm0,
    hm0SsM: 4 * Math.sqrt(Math.max(0, m0 - mIg)),
    hm0IgM: evaluateIg ? 4 * Math.sqrt(mIg) : null,
    tpS: 1 / fp,
    tm01S: m0 / m1,
    tm02S: Math.sqrt(m0 / m2),
    hrmsM: Math.sqrt(8 * m0),
    hm0SigmaM: hm0 / Math.sqrt(2 * nuEff),
    nuEff,
    nBins: mHi - mLo + 1,
  };
}

/**
 * Least-squares level a of S(f) = a f^-4 over bins mLo..mHi of sEta (f_m = m df): a = sum S f^-4 / sum f^-8.
 * The f^-4 (saturation-range) tail of Jones & Monismith (2007), Limnol. Oceanogr. Methods 5, 317-327, used
 * to extend a spectrum above the pressure-response cutoff. Returns 0 for an empty range.
 */
export function fitF4Tail(sEta: Float64Array, dfHz: number, mLo: number, mHi: number): number {
  let num = 0;
  let den = 0;
  for (let m = mLo; m <= mHi; m++) {
    const f4 = (m * dfHz) ** -4;
    num += (sEta[m] as number) * f4;
    den += f4 * f4;
  }
  return den > 0 ? num / den : 0;
}
