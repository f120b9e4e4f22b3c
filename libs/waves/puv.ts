// PUV wave direction and directional spread from a bottom pressure burst and synchronous near-bed horizontal
// velocities (docs/methods/waves.md 4.7): first-order Fourier coefficients of the directional distribution
// (Longuet-Higgins, Cartwright & Smith 1963), mean direction and spread sigma1 after Kuik, van Vledder &
// Holthuijsen (1988), J. Phys. Oceanogr. 18, 1020-1034, with the linear-theory energy ratio r as QC.
import { cutoffFrequency } from './bulk.js';
import { G_STANDARD, solveDispersionGrid, pressureResponse } from './dispersion.js';
import { detrend, fillGaps } from './prep.js';
import type { QartodFlag, WavesErrorCode } from './types.js';
import { chooseSegmentLength, hannWindow, segmentCount, segmentTransform, welchDof } from './welch.js';

export interface PuvInput {
  /** absolute pressure [dbar]; null or non-finite samples are gaps (as in analyzeBurst) */
  readonly pDbar: ArrayLike<number | null>;
  /** east velocity [m s-1], same length and clock as p */
  readonly uMS: ArrayLike<number | null>;
  /** north velocity [m s-1] */
  readonly vMS: ArrayLike<number | null>;
  readonly fsHz: number;
  /** pressure sensor height above the bed z_p [m] */
  readonly sensorHeightM: number;
  /** velocity sample height above the bed z_u [m] */
  readonly velocityHeightM: number;
  readonly patmDbar: number;
  readonly rhoKgM3: number;
  readonly gMS2?: number;
}

export interface PuvOptions {
  readonly nperseg?: number;
  /** lower edge of the sea-swell band [Hz], default 0.04 */
  readonly splitHz?: number;
  readonly maxFreqHz?: number;
  readonly minKp2?: number;
  /** energy-weighted r outside [rMin, rMax] gives flag 3; defaults 0.5 and 2 */
  readonly rMin?: number;
  readonly rMax?: number;
}

export type PuvResult =
  | {
      readonly ok: true;
      readonly flag: QartodFlag;
      /** mean direction waves come from, degrees true clockwise from north, [0, 360) */
      readonly dirFromDeg: number;
      /** directional spread sigma1 [deg] */
      readonly spreadDeg: number;
      /** energy-weighted (S_uu + S_vv) Kp^2/(S_pp Ku^2); 1 for linear waves */
      readonly rRatio: number;
      readonly depthM: number;
      readonly bandHz: readonly [number, number];
      readonly dof: number;
    }
  | { readonly ok: false; readonly flag: 3 | 4 | 9; readonly code: WavesErrorCode; readonly reason: string };

const fail = (flag: 3 | 4 | 9, code: WavesErrorCode, reason: string): PuvResult => ({
  ok: false,
  flag,
  code,
  reason,
});

/** The burst's metadata and segment length; a PuvFail when they are unusable. */
function checkPuvInput(input: PuvInput, options: PuvOptions) {
  const n = input.pDbar.length;
  const fs = input.fsHz;
  const zp = input.sensorHeightM;
  const zu = input.velocityHeightM;
  if (input.uMS.length !== n || input.vMS.length !== n) {
    return fail(
      9,
      'REEFD_WAVES_LENGTH_MISMATCH',
      `p, u and v must have the same length (${n}, ${input.uMS.length}, ${input.vMS.length})`,
    );
  }
  if (n < 16 || !(fs > 0))
    return fail(4, 'REEFD_WAVES_TOO_SHORT', `need >= 16 samples and fs > 0 (got ${n}, ${fs})`);
  if (!Number.isFinite(input.patmDbar) || !(input.rhoKgM3 > 0) || !(zp >= 0) || !(zu >= 0)) {
    return fail(
      9,
      'REEFD_WAVES_BAD_INPUT',
      'p_atm, rho and both sensor heights must be given (finite, heights >= 0)',
    );
  }
  const ns = options.nperseg ?? chooseSegmentLength(n, fs);
  if (ns < 8 || ns > n || (ns & (ns - 1)) !== 0) {
    return fail(9, 'REEFD_WAVES_BAD_INPUT', `nperseg must be a power of two in [8, ${n}], got ${ns}`);
  }
  return { n, fs, ns };
}

/** Gap-filled, detrended p (as head), u and v, and the water depth; a PuvFail for gappy input or a dry sensor. */
function prepareChannels(input: PuvInput, n: number, g: number) {
  const fs = input.fsHz;
  const zp = input.sensorHeightM;
  const zu = input.velocityHeightM;
  const chans = [new Float64Array(n), new Float64Array(n), new Float64Array(n)] as const;
  const srcs = [input.pDbar, input.uMS, input.vMS];
  for (let c = 0; c < 3; c++) {
    const bad = fillGaps(srcs[c] as ArrayLike<number | null>, chans[c] as Float64Array, n);
    if (bad < 0 || bad > 0.05 * n)
      return fail(4, 'REEFD_WAVES_NONFINITE', `channel ${'puv'[c]}: > 5 % non-finite`);
  }
  const px = chans[0];
  const cc = 1e4 / (input.rhoKgM3 * g);
  let mean = 0;
  for (let i = 0; i < n; i++) {
    px[i] = cc * ((px[i] as number) - input.patmDbar);
    mean += px[i] as number;
  }
  mean /= n;
  const h = mean + zp;
  if (!(mean >= 0.05) || zu > h)
    return fail(4, 'REEFD_WAVES_DRY', `sensor out of the water (head ${mean.toFixed(3)} m)`);
  const order = n / fs > 3600 ? 2 : 1;
  for (const ch of chans) detrend(ch, n, order);
  return { chans, h };
}

/**
 * Cross-spectral Welch (same window, overlap and scaling as welch.ts; the common factor cancels in a1, b1, r):
 * per bin Spp, Suu, Svv, Cpu, Cpv, Cuv, and the number of segments.
 */
function crossSpectra(chans: readonly [Float64Array, Float64Array, Float64Array], n: number, ns: number) {
  const half = ns / 2;
  const K = segmentCount(n, ns);
  const { w } = hannWindow(ns);
  const seg = new Float64Array(ns);
  const specs = [new Float64Array(2 * ns), new Float64Array(2 * ns), new Float64Array(2 * ns)] as const;
  const acc = new Float64Array(6 * (half + 1)); // Spp, Suu, Svv, Cpu, Cpv, Cuv per bin
  for (let j = 0; j < K; j++) {
    for (let c = 0; c < 3; c++)
      segmentTransform(chans[c] as Float64Array, j * half, ns, w, seg, specs[c] as Float64Array);
    const [sp, su, sv] = specs;
    for (let m = 0; m <= half; m++) {
      const pr = sp[2 * m] as number,
        pi = sp[2 * m + 1] as number;
      const ur = su[2 * m] as number,
        ui = su[2 * m + 1] as number;
      const vr = sv[2 * m] as number,
        vi = sv[2 * m + 1] as number;
      const o = 6 * m;
      acc[o] = (acc[o] as number) + pr * pr + pi * pi;
      acc[o + 1] = (acc[o + 1] as number) + ur * ur + ui * ui;
      acc[o + 2] = (acc[o + 2] as number) + vr * vr + vi * vi;
      acc[o + 3] = (acc[o + 3] as number) + pr * ur + pi * ui;
      acc[o + 4] = (acc[o + 4] as number) + pr * vr + pi * vi;
      acc[o + 5] = (acc[o + 5] as number) + ur * vr + ui * vi;
    }
  }
  return { acc, K };
}

/**
 * Energy-weighted band sums over bins mLo..mHi: sum S_eta, and the S_eta-weighted a1, b1 and r (to be divided
 * by the first).
 */
function bandSums(
  acc: Float64Array,
  mLo: number,
  mHi: number,
  df: number,
  h: number,
  input: PuvInput,
  g: number,
) {
  const zp = input.sensorHeightM;
  const zu = input.velocityHeightM;
  const count = mHi - mLo + 1;
  const omega = new Float64Array(count);
  const kk = new Float64Array(count);
  for (let j = 0; j < count; j++) omega[j] = 2 * Math.PI * (mLo + j) * df;
  solveDispersionGrid(omega[0] as number, 2 * Math.PI * df, count, h, g, kk);
  let sw = 0,
    a1 = 0,
    b1 = 0,
    rr = 0;
  for (let j = 0; j < count; j++) {
    const o = 6 * (mLo + j);
    const spp = acc[o] as number;
    const suv = (acc[o + 1] as number) + (acc[o + 2] as number);
    if (!(spp > 0 && suv > 0)) continue;
    const k = kk[j] as number;
    const kp = pressureResponse(k, zp, h);
    // Ku = omega cosh(k z_u)/sinh(k h), written with exponentials to avoid overflow
    const ku =
      ((omega[j] as number) * Math.exp(k * (zu - h)) * (1 + Math.exp(-2 * k * zu))) /
      (1 - Math.exp(-2 * k * h));
    const sEta = spp / (kp * kp);
    const gg = Math.sqrt(spp * suv);
    sw += sEta;
    a1 += (sEta * (acc[o + 3] as number)) / gg;
    b1 += (sEta * (acc[o + 4] as number)) / gg;
    rr += (sEta * (suv * kp * kp)) / (spp * ku * ku);
  }
  return { sw, a1, b1, rr };
}

/**
 * Mean wave direction (from, degrees true) and spread over the sea-swell band. Bulk a1, b1 are weighted by
 * S_eta = S_pp/Kp^2; theta = (270 - atan2(b1, a1)) mod 360; sigma1 = sqrt(2 (1 - sqrt(a1^2 + b1^2))).
 * The Doppler shift by the mean current is neglected (|U| << omega/k). Check value: a single linear wave
 * travelling towards the north-east comes from 225 deg with spread 0 and r = 1 (algebra of 4.7).
 */
export function puvDirection(input: PuvInput, options: PuvOptions = {}): PuvResult {
  const g = input.gMS2 ?? G_STANDARD;
  const zp = input.sensorHeightM;
  const checked = checkPuvInput(input, options);
  if ('ok' in checked) return checked;
  const { n, fs, ns } = checked;
  const prepared = prepareChannels(input, n, g);
  if ('ok' in prepared) return prepared;
  const { chans, h } = prepared;
  const { acc, K } = crossSpectra(chans, n, ns);
  const half = ns / 2;

  const df = fs / ns;
  const split = options.splitHz ?? 0.04;
  const cut = cutoffFrequency(h, zp, fs, options.maxFreqHz ?? 1.0, options.minKp2 ?? 0.1, g);
  const mLo = Math.max(1, Math.ceil((split - 1e-9 * df) / df));
  const mHi = Math.min(half, Math.floor((cut.fHz + 1e-9 * df) / df));
  if (mHi < mLo)
    return fail(4, 'REEFD_WAVES_NO_BAND', `no sea-swell band: cutoff ${cut.fHz} Hz below ${split} Hz`);
  const sums = bandSums(acc, mLo, mHi, df, h, input, g);
  const sw = sums.sw;
  if (!(sw > 0)) return fail(4, 'REEFD_WAVES_NO_BAND', 'no wave energy in the sea-swell band');
  const a1 = sums.a1 / sw;
  const b1 = sums.b1 / sw;
  const rr = sums.rr / sw;
  const alphaDeg = (Math.atan2(b1, a1) * 180) / Math.PI;
  const dirFromDeg = (((270 - alphaDeg) % 360) + 360) % 360;
  const r1 = Math.min(1, Math.sqrt(a1 * a1 + b1 * b1));
  const spreadDeg = (Math.sqrt(2 * (1 - r1)) * 180) / Math.PI;
  const rMin = options.rMin ?? 0.5;
  const rMax = options.rMax ?? 2;
  return {
    ok: true,
    flag: rr >= rMin && rr <= rMax ? 1 : 3,
    dirFromDeg,
    spreadDeg,
    rRatio: rr,
    depthM: h,
    bandHz: [mLo * df, mHi * df],
    dof: welchDof(K),
  };
}
