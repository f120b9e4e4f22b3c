// Harmonic analysis of a water-level record (docs/methods/forecast.md 11.2): least squares on a mean plus
// cos/sin pairs at the frequencies of the main tidal constituents (the method of classical harmonic analysis,
// e.g. Foreman 1977, IOS Pacific Marine Science Report 77-10; Pawlowicz, Beardsley & Lentz 2002, Comput.
// Geosci. 28, 929), with the constituents chosen by the Rayleigh criterion: two frequencies are fitted
// together only when the record holds at least one beat period between them. No nodal corrections: records
// of weeks, forecasts of hours.
import { weightedLeastSquares } from '../daily/index.js';

/** Constituent frequencies, cycles per hour (Doodson numbers; the values of the standard tidal tables,
 * from memory), in the order they are admitted. */
export const CONSTITUENTS = [
  ['M2', 0.0805114007],
  ['K1', 0.0417807462],
  ['S2', 0.0833333333],
  ['O1', 0.0387306544],
  ['M4', 0.1610228013],
  ['N2', 0.0789992487],
  ['K2', 0.0835614924],
  ['P1', 0.0415525871],
  ['Q1', 0.0372185026],
  ['MS4', 0.163844734],
  ['M6', 0.241534202],
] as const;
export type ConstituentName = (typeof CONSTITUENTS)[number][0];

/** Reference epoch of the phases: 2000-01-01T00:00Z (phases are local to this epoch, not Greenwich phases). */
export const TIDE_EPOCH_MS = Date.UTC(2000, 0, 1);

export interface Constituent {
  name: ConstituentName;
  freqCph: number;
  /** Amplitude (the record's unit) and phase lag (deg) of A cos(2 pi f t - g), t in hours from the epoch. */
  amplitude: number;
  phaseDeg: number;
  amplitudeSe: number;
  phaseSeDeg: number;
}

export interface TideFit {
  ok: true;
  meanLevel: number;
  constituents: Constituent[];
  /** Standard deviation of the residual (the record's unit): surge, setup, noise. */
  residualSd: number;
  /** Start and end of the record used, ms. */
  fromMs: number;
  toMs: number;
  n: number;
}

export type TideFitResult = TideFit | { ok: false; reason: string };

export interface TideFitOptions {
  /** Rayleigh factor: frequencies closer than rayleigh/T are not fitted together (default 1). */
  rayleigh?: number;
  /** Only the last maxRecordDays of the record are used (default 30). */
  maxRecordDays?: number;
  /** Fewest samples (default 24). */
  minSamples?: number;
  /** Constituents allowed (default all of CONSTITUENTS). */
  allow?: readonly ConstituentName[];
}

/** Constituents resolvable in a record of spanH hours by the Rayleigh criterion, in admission order. */
export function selectConstituents(
  spanH: number,
  rayleigh = 1,
  allow: readonly ConstituentName[] = CONSTITUENTS.map((c) => c[0]),
): (typeof CONSTITUENTS)[number][] {
  const out: (typeof CONSTITUENTS)[number][] = [];
  for (const c of CONSTITUENTS) {
    if (!allow.includes(c[0])) continue;
    if (c[1] * spanH < rayleigh) continue;
    if (out.every((o) => Math.abs(o[1] - c[1]) * spanH >= rayleigh)) out.push(c);
  }
  return out;
}

/**
 * Fits the record (times ms, levels) by least squares. Check (analytic): a pure M2 + S2 series over 30 days
 * returns both amplitudes and phases to 1e-9 and a zero residual.
 */
export function fitTide(
  tMs: readonly number[],
  level: readonly number[],
  options: TideFitOptions = {},
): TideFitResult {
  const n0 = tMs.length;
  if (n0 === 0) return { ok: false, reason: 'empty record' };
  const toMs = tMs[n0 - 1] as number;
  const fromLimit = toMs - (options.maxRecordDays ?? 30) * 86_400_000;
  const idx: number[] = [];
  for (let i = 0; i < n0; i++) if ((tMs[i] as number) >= fromLimit && Number.isFinite(level[i])) idx.push(i);
  if (idx.length < (options.minSamples ?? 24)) return { ok: false, reason: `${idx.length} samples` };
  const fromMs = tMs[idx[0] as number] as number;
  const spanH = (toMs - fromMs) / 3.6e6;
  const cons = selectConstituents(spanH, options.rayleigh ?? 1, options.allow);
  const hours = idx.map((i) => ((tMs[i] as number) - TIDE_EPOCH_MS) / 3.6e6);
  const rows = hours.map((h) => {
    const row = [1];
    for (const [, f] of cons) row.push(Math.cos(2 * Math.PI * f * h), Math.sin(2 * Math.PI * f * h));
    return row;
  });
  const y = idx.map((i) => level[i] as number);
  const fit = weightedLeastSquares(rows, y);
  if (!fit.ok) return { ok: false, reason: fit.reason };
  const p = fit.p;
  const s2 = fit.n > p ? fit.chi2 / (fit.n - p) : 0;
  const cov = (i: number, j: number) => s2 * (fit.covUnscaled[i * p + j] as number);
  const constituents = cons.map(([name, f], k) => {
    const a = fit.coef[1 + 2 * k] as number;
    const b = fit.coef[2 + 2 * k] as number;
    const A = Math.hypot(a, b);
    // A = hypot(a, b), g = atan2(b, a): first-order sigmas from the 2 x 2 covariance of (a, b).
    const ia = 1 + 2 * k;
    const ib = 2 + 2 * k;
    const varA =
      A > 0 ? (a * a * cov(ia, ia) + 2 * a * b * cov(ia, ib) + b * b * cov(ib, ib)) / (A * A) : NaN;
    const varG = A > 0 ? (b * b * cov(ia, ia) - 2 * a * b * cov(ia, ib) + a * a * cov(ib, ib)) / A ** 4 : NaN;
    return {
      name,
      freqCph: f,
      amplitude: A,
      phaseDeg: ((((Math.atan2(b, a) * 180) / Math.PI) % 360) + 360) % 360,
      amplitudeSe: Math.sqrt(Math.max(0, varA)),
      phaseSeDeg: (Math.sqrt(Math.max(0, varG)) * 180) / Math.PI,
    };
  });
  return {
    ok: true,
    meanLevel: fit.coef[0] as number,
    constituents,
    residualSd: Math.sqrt(s2),
    fromMs,
    toMs,
    n: fit.n,
  };
}

/** The fitted tide at time tMs (mean level plus the constituents). */
export function predictTide(fit: TideFit, tMs: number): number {
  const h = (tMs - TIDE_EPOCH_MS) / 3.6e6;
  let z = fit.meanLevel;
  for (const c of fit.constituents)
    z += c.amplitude * Math.cos(2 * Math.PI * c.freqCph * h - (c.phaseDeg * Math.PI) / 180);
  return z;
}
