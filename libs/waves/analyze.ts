// Waves from one bottom-pressure burst (docs/methods/waves.md 4.1-4.5): gap filling, head
// (docs/methods/seawater.md 2.2), detrending, Hampel despiking, Welch spectrum, linear pressure-response
// correction up to a cutoff, spectral bulk statistics and zero-crossing statistics of the reconstructed
// surface, each with its QARTOD flag.
import { cutoffFrequency, fitF4Tail, spectralStats, type SpectralStats } from './bulk.js';
import { chi2Quantile } from './chi2.js';
import { G_STANDARD, responseOnGrid } from './dispersion.js';
import { despike, detrend, fillGaps } from './prep.js';
import type { BurstInput, QartodFlag, WaveOptions, WavesErrorCode, WavesFail, WavesResult } from './types.js';
import { chooseSegmentLength, welchDof, welchInto } from './welch.js';
import {
  makeReconWork,
  reconstructSurface,
  zeroCrossingStats,
  type ReconWork,
  type ZeroCrossingStats,
} from './zerocross.js';

/** dbar, one standard atmosphere (1 atm = 10.1325 dbar, docs/methods/conventions.md 1.3): the default p_atm. */
export const PATM_STANDARD_DBAR = 10.1325;

const DEFAULTS = {
  maxFreqHz: 1.0,
  minKp2: 0.1,
  igLowHz: 0.005,
  splitHz: 0.04,
  dryMarginM: 0.05,
  minSdM: 0.002,
  spikeSigma: 5,
  quadraticDetrendAboveS: 3600,
  maxIgDfHz: 0.005,
  minWaves: 50,
} as const;

/** Scratch for one burst length; see the note on module state below. */
interface Work {
  readonly n: number;
  readonly x: Float64Array;
  readonly eta: Float64Array;
  readonly scratch: Float64Array; // 2n, for the medians and the wave heights
  readonly recon: ReconWork;
  readonly kFine: Float64Array; // n/2 + 1
  readonly kpFine: Float64Array;
  psd: Float64Array;
  kBins: Float64Array;
  kpBins: Float64Array;
}

// Module state, deliberately: the scratch arrays for the last few burst lengths, so that a station's stream of
// equal-length bursts allocates nothing per burst on the hot path. Every array is fully overwritten before it
// is read, so results never depend on earlier calls; nothing here escapes into a result. Bounded (cleared past
// 8 lengths); JavaScript runs one call at a time, so the scratch is never shared by two analyses at once.
const works = new Map<number, Work>();

function workFor(n: number, ns: number): Work {
  let w = works.get(n);
  if (w === undefined) {
    if (works.size >= 8) works.clear();
    w = {
      n,
      x: new Float64Array(n),
      eta: new Float64Array(n),
      scratch: new Float64Array(2 * n),
      recon: makeReconWork(n),
      kFine: new Float64Array((n >> 1) + 1),
      kpFine: new Float64Array((n >> 1) + 1),
      psd: new Float64Array(0),
      kBins: new Float64Array(0),
      kpBins: new Float64Array(0),
    };
    works.set(n, w);
  }
  if (w.psd.length !== ns / 2 + 1) {
    w.psd = new Float64Array(ns / 2 + 1);
    w.kBins = new Float64Array(ns / 2 + 1);
    w.kpBins = new Float64Array(ns / 2 + 1);
  }
  return w;
}

function fail(flag: 3 | 4 | 9, code: WavesErrorCode, reason: string, depthM?: number): WavesFail {
  return depthM === undefined ? { ok: false, flag, code, reason } : { ok: false, flag, code, reason, depthM };
}

const worst = (a: QartodFlag, b: QartodFlag): QartodFlag => (a === 9 || b === 9 ? 9 : a > b ? a : b);

const resolveOptions = (options: WaveOptions) => ({ ...DEFAULTS, ...options });
type Options = ReturnType<typeof resolveOptions>;

/** One burst under analysis: its checked metadata, the scratch, and the flag and notes found so far. */
interface Burst {
  readonly input: BurstInput;
  readonly o: Options;
  readonly n: number;
  readonly fs: number;
  readonly g: number;
  readonly zs: number;
  readonly ns: number;
  readonly w: Work;
  readonly notes: string[];
  qc: QartodFlag;
}

/** Checks the burst's metadata and takes its scratch; a WavesFail if it cannot give numbers. */
function openBurst(input: BurstInput, o: Options): Burst | WavesFail {
  const p = input.pDbar;
  const n = p.length;
  const fs = input.fsHz;
  const g = input.gMS2 ?? G_STANDARD;
  const zs = input.sensorHeightM;
  if (n === 0) return fail(9, 'REEFD_WAVES_EMPTY', 'the burst has no samples; nothing to analyse');
  if (!(fs > 0) || !Number.isFinite(fs)) {
    return fail(4, 'REEFD_WAVES_BAD_INPUT', `sampling rate fsHz must be a positive number, got ${fs}`);
  }
  if (n < 16) return fail(4, 'REEFD_WAVES_TOO_SHORT', `a burst needs at least 16 samples, got ${n}`);
  if (!Number.isFinite(input.patmDbar) || !(input.rhoKgM3 > 0) || !(g > 0) || !(zs >= 0)) {
    return fail(
      9,
      'REEFD_WAVES_BAD_INPUT',
      `station state missing or invalid (patmDbar=${input.patmDbar}, rhoKgM3=${input.rhoKgM3}, gMS2=${g}, sensorHeightM=${zs}); pass p_atm in dbar (10.1325 if no barometer), rho from the CTD and the sensor height`,
    );
  }
  const ns = o.nperseg ?? chooseSegmentLength(n, fs);
  if (ns < 8 || ns > n || (ns & (ns - 1)) !== 0) {
    return fail(9, 'REEFD_WAVES_BAD_INPUT', `nperseg must be a power of two in [8, ${n}], got ${ns}`);
  }
  return { input, o, n, fs, g, zs, ns, w: workFor(n, ns), notes: [], qc: 1 };
}

/** 4.1.1 gaps, 4.1.2-3 head and mean depth: the head into w.x; the mean depth, or a WavesFail. */
function headAndDepth(b: Burst): number | WavesFail {
  const { input, o, n, zs } = b;
  const x = b.w.x;
  // 4.1.1 gaps
  const bad = fillGaps(input.pDbar, x, n);
  if (bad < 0 || bad > 0.05 * n) {
    const pct = bad < 0 ? 100 : (100 * bad) / n;
    return fail(4, 'REEFD_WAVES_NONFINITE', `${pct.toFixed(1)} % of the samples are not finite (limit 5 %)`);
  }
  b.qc = bad > 0.01 * n ? 3 : 1;
  if (bad > 0) b.notes.push(`interpolated ${bad} non-finite samples`);

  // 4.1.2-3 head and mean depth
  const c = 1e4 / (input.rhoKgM3 * b.g);
  let mean = 0;
  for (let i = 0; i < n; i++) {
    const v = c * ((x[i] as number) - input.patmDbar);
    x[i] = v;
    mean += v;
  }
  mean /= n;
  const depthM = mean + zs;
  if (!(mean >= o.dryMarginM)) {
    return fail(
      4,
      'REEFD_WAVES_DRY',
      `mean water head above the sensor is ${mean.toFixed(3)} m (< ${o.dryMarginM} m): sensor out of the water`,
      depthM,
    );
  }
  return depthM;
}

/** 4.1.4 detrend and 4.1.5 despike the head in place; a WavesFail for a flat or spiky record. */
function detrendDespike(b: Burst, depthM: number): WavesFail | null {
  const { o, n, fs } = b;
  const x = b.w.x;
  // 4.1.4 detrend
  const durationS = n / fs;
  detrend(x, n, durationS > o.quadraticDetrendAboveS ? 2 : 1);
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (x[i] as number) * (x[i] as number);
  const sd = Math.sqrt(ss / n);
  if (!(sd >= o.minSdM)) {
    return fail(
      4,
      'REEFD_WAVES_FLAT',
      `detrended head sd is ${(sd * 1000).toFixed(2)} mm (< ${o.minSdM * 1000} mm): flat or clipped record`,
      depthM,
    );
  }

  // 4.1.5 despike; the robust sigma is floored at the flat-record threshold (see prep.ts)
  const spikes = despike(x, n, o.spikeSigma, o.minSdM, b.w.scratch, b.w.eta);
  if (spikes > 0.05 * n) {
    return fail(4, 'REEFD_WAVES_SPIKY', `${spikes} of ${n} samples are spikes (> 5 %)`, depthM);
  }
  if (spikes > 0.01 * n) b.qc = worst(b.qc, 3);
  if (spikes > 0) {
    b.notes.push(`replaced ${spikes} spikes`);
    return flatOnceDespiked(b, spikes, depthM);
  }
  return null;
}

/** A flat record with a few spikes passed the sd test on the strength of the spikes: test again. */
function flatOnceDespiked(b: Burst, spikes: number, depthM: number): WavesFail | null {
  const { o, n } = b;
  const x = b.w.x;
  let m2 = 0;
  for (let i = 0; i < n; i++) m2 += x[i] as number;
  m2 /= n;
  let ss2 = 0;
  for (let i = 0; i < n; i++) ss2 += ((x[i] as number) - m2) ** 2;
  const sd2 = Math.sqrt(ss2 / n);
  if (!(sd2 >= o.minSdM)) {
    return fail(
      4,
      'REEFD_WAVES_FLAT',
      `head sd is ${(sd2 * 1000).toFixed(2)} mm once ${spikes} spikes are removed (< ${o.minSdM * 1000} mm): flat record with spikes`,
      depthM,
    );
  }
  return null;
}

/**
 * 4.3 cutoff and pressure response: turns the head spectrum w.psd into the surface spectrum up to the cutoff
 * (zero above, or an f^-4 tail when asked). Returns the cutoff, the top whole-burst bin and the statistics' top.
 */
function surfaceSpectrum(b: Burst, depthM: number, df: number) {
  const { o, n, fs, ns, zs, g, w } = b;
  // 4.3 cutoff and pressure response. k and Kp are computed once on the whole-burst grid f = m fs/N (needed
  // by the reconstruction); when Ns divides N the Welch bins are every (N/Ns)-th of those bins.
  const cut = cutoffFrequency(depthM, zs, fs, o.maxFreqHz, o.minKp2, g);
  b.notes.push(`cutoff ${cut.fHz.toPrecision(3)} Hz (${cut.by})`);
  const mTop = Math.min(ns / 2, Math.floor((cut.fHz + 1e-9 * df) / df));
  const dfN = fs / n;
  // the Welch bins up to mTop must be covered exactly, whatever the rounding of the two floors
  const mTopN = Math.max(
    Math.min(n >> 1, Math.floor((cut.fHz + 1e-9 * dfN) / dfN)),
    n % ns === 0 ? mTop * (n / ns) : 0,
  );
  responseOnGrid(dfN, mTopN + 1, depthM, zs, g, w.kFine, w.kpFine);
  const sEta = w.psd;
  if (n % ns === 0) {
    const step = n / ns;
    for (let m = 0; m <= mTop; m++) {
      const kp = w.kpFine[m * step] as number;
      sEta[m] = (sEta[m] as number) / (kp * kp);
    }
  } else {
    responseOnGrid(df, mTop + 1, depthM, zs, g, w.kBins, w.kpBins);
    for (let m = 0; m <= mTop; m++) {
      const kp = w.kpBins[m] as number;
      sEta[m] = (sEta[m] as number) / (kp * kp);
    }
  }
  for (let m = mTop + 1; m < sEta.length; m++) sEta[m] = 0;
  return { cut, mTopN, statsTopHz: addTail(b, cut.fHz, mTop, df) };
}

/** The optional f^-4 tail above the cutoff (WaveOptions.tailToHz); returns the top of the statistics. */
function addTail(b: Burst, cutHz: number, mTop: number, df: number): number {
  const { o, ns } = b;
  const sEta = b.w.psd;
  let statsTopHz = cutHz;
  if (o.tailToHz !== undefined && o.tailToHz > cutHz) {
    const mTail = Math.min(ns / 2, Math.floor((o.tailToHz + 1e-9 * df) / df));
    const a = fitF4Tail(sEta, df, Math.max(1, Math.ceil(0.75 * mTop)), mTop);
    if (a > 0 && mTail > mTop) {
      for (let m = mTop + 1; m <= mTail; m++) sEta[m] = a / (m * df) ** 4;
      statsTopHz = mTail * df;
      b.notes.push(`f^-4 tail added from ${cutHz.toPrecision(3)} to ${statsTopHz.toPrecision(3)} Hz`);
    }
  }
  return statsTopHz;
}

/**
 * Analyses one pressure burst. Units: p and p_atm in dbar, heights in m, rho in kg m-3, fs in Hz, times in
 * ms. Returns the bulk wave record, or { ok: false } with a QARTOD flag and a stable code when the burst
 * cannot give numbers: empty or unusable metadata (9), fewer than 16 samples, fs <= 0, > 5 % non-finite,
 * dry sensor, flat/clipped record or > 5 % spikes (4).
 */
export function analyzeBurst(input: BurstInput, options: WaveOptions = {}): WavesResult {
  const b = openBurst(input, resolveOptions(options));
  if ('ok' in b) return b;
  const { o, n, fs, ns, w, notes } = b;
  const depthM = headAndDepth(b);
  if (typeof depthM !== 'number') return depthM;
  const failed = detrendDespike(b, depthM);
  if (failed !== null) return failed;

  // 4.2 Welch spectrum of the head
  const k = welchInto(w.x, n, fs, ns, w.psd);
  const dof = welchDof(k);
  const df = fs / ns;
  notes.push(`Welch: nperseg ${ns}, ${k} segments, df ${df.toPrecision(3)} Hz, nu ${dof.toPrecision(3)}`);
  const { cut, mTopN, statsTopHz } = surfaceSpectrum(b, depthM, df);

  // 4.4 bulk statistics
  const evaluateIg = df <= o.maxIgDfHz;
  if (!evaluateIg) notes.push(`IG band not evaluated: df ${df.toPrecision(3)} Hz > ${o.maxIgDfHz} Hz`);
  const stats = spectralStats(w.psd, df, statsTopHz, o.igLowHz, o.splitHz, evaluateIg, dof);
  if (stats === null) {
    return fail(
      4,
      'REEFD_WAVES_NO_BAND',
      `no energy between ${o.igLowHz} Hz and the cutoff ${cut.fHz} Hz`,
      depthM,
    );
  }
  const ssFlag: QartodFlag = cut.fHz < 0.05 ? 4 : 1;
  if (ssFlag === 4) notes.push(`cutoff below 0.05 Hz: sea-swell statistics fail`);
  const igFlag: QartodFlag = evaluateIg ? b.qc : 2;

  // 4.5 surface reconstruction over the total band, zero-crossing statistics
  const fLo = evaluateIg ? o.igLowHz : o.splitHz;
  const dfN = fs / n;
  const mLoN = Math.max(1, Math.ceil((fLo - 1e-9 * dfN) / dfN));
  reconstructSurface(w.x, w.kpFine, mLoN, mTopN, w.recon, w.eta);
  const zc = zeroCrossingStats(w.eta, n, fs, w.scratch);
  return waveRecord(b, { depthM, cutoffHz: cut.fHz, dof, ssFlag, igFlag }, stats, zc);
}

/** The bulk wave record from the spectral and zero-crossing statistics. */
function waveRecord(
  b: Burst,
  r: { depthM: number; cutoffHz: number; dof: number; ssFlag: QartodFlag; igFlag: QartodFlag },
  stats: SpectralStats,
  zc: ZeroCrossingStats,
): WavesResult {
  const { qc, n, fs } = b;
  const { depthM, dof, ssFlag } = r;
  const zcFlag = worst(qc, zc.nWaves < b.o.minWaves ? 3 : 1);
  return {
    ok: true,
    flag: worst(qc, ssFlag),
    tCentreMs: b.input.t0Ms + (n / (2 * fs)) * 1000,
    hm0M: stats.hm0M,
    tpS: stats.tpS,
    tm01S: stats.tm01S,
    tm02S: stats.tm02S,
    hrmsM: stats.hrmsM,
    hm0SsM: stats.hm0SsM,
    hm0IgM: stats.hm0IgM,
    depthM,
    cutoffHz: r.cutoffHz,
    dof,
    psdCi95: { lower: dof / chi2Quantile(0.975, dof), upper: dof / chi2Quantile(0.025, dof) },
    hm0SigmaM: stats.hm0SigmaM,
    h13M: zc.h13M,
    h110M: zc.h110M,
    hmaxM: zc.hmaxM,
    tzS: zc.tzS,
    nWaves: zc.nWaves,
    flags: { ss: worst(qc, ssFlag), ig: r.igFlag, zeroCrossing: zcFlag },
    notes: b.notes,
  };
}
