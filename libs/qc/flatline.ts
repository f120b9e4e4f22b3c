// The flat-line family of one variable (docs/methods/qc.md 7.2 test 7 and docs/methods/faults.md 12.3):
// - the eps/T rule: every value over the last T_s (T_f) within eps of V_n gives 3 (4), for slowly varying,
//   coarsely resolved signals;
// - the repeat rule: a run of bit-identical readings judged against the sensor's own repeat chance (noise.ts);
// - stuck-at: readings exactly on zero or on a rail of the sensor's range.
// The caller (state.ts) reports the worse of the first two as `flat_line` and the third as `stuck`.

import { binnedSummary, type BinnedStats } from './binned-stats.js';
import type { QcFlag } from './flags.js';
import type { FlatLineLimits, RepeatLimits } from './limits.js';
import { noiseAddRun, noiseScales, type NoiseLimits, type NoiseProfile } from './noise.js';
import { repeatFlag, repeatRunNeeded } from './tests.js';

/** The current run of identical readings. Plain JSON. */
export interface RepeatRun {
  v: number;
  /** Time of the run's first reading, ms: since when a frozen sensor has been frozen. */
  startMs: number;
  length: number;
  /** The run reached the frozen length: its repeats never enter the noise profile. */
  frozen: boolean;
}

export interface FlatVerdict {
  readonly flag: QcFlag;
  /** Start of the flat stretch when flag is 3 or 4, ms. */
  readonly sinceMs?: number;
}

/**
 * Eps/T rule (test 7): all values over the last T_s (T_f) within eps of V_n gives 3 (4). Resolved to the bins of the
 * window: bins overlapping the span count whole, and the span counts as covered when the first sample in it is no
 * later than one bin after its start. 2 until the span is covered.
 */
export function epsFlatLine(s: BinnedStats, tMs: number, v: number, f: FlatLineLimits): FlatVerdict {
  const within = (spanMs: number): boolean | undefined => {
    const w = binnedSummary(s, tMs - spanMs, tMs);
    if (!(w.firstMs <= tMs - spanMs + s.binMs) || w.n < 2) return undefined;
    return w.min >= v - f.eps && w.max <= v + f.eps;
  };
  const sus = within(f.suspectMs);
  if (sus === undefined) return { flag: 2 };
  if (!sus) return { flag: 1 };
  return within(f.failMs) === true
    ? { flag: 4, sinceMs: tMs - f.failMs }
    : { flag: 3, sinceMs: tMs - f.suspectMs };
}

/**
 * Advances the repeat run by one usable reading and judges it. `contiguous` is false after a gap or an unusable
 * reading: the run restarts (a gap says nothing about what the sensor did meanwhile). A finished run that was not
 * frozen is added to the noise profile's repeat count.
 */
export function repeatStep(
  run: RepeatRun | null,
  p: NoiseProfile,
  lim: RepeatLimits,
  noiseLim: NoiseLimits,
  tMs: number,
  v: number,
  contiguous: boolean,
): { run: RepeatRun; verdict: FlatVerdict } {
  let r = run;
  if (r !== null && contiguous && v === r.v) {
    r.length++;
  } else {
    // A run closed by a new value ends in a change; one cut by a gap did not show its end (no change counted).
    if (r !== null && !r.frozen) {
      if (contiguous) noiseAddRun(p, r.length, noiseLim);
      else if (r.length > 1) noiseAddRun(p, r.length, noiseLim, false);
    }
    r = { v, startMs: tMs, length: 1, frozen: false };
  }
  const needed = r.frozen ? 1 : repeatRunNeeded(noiseScales(p, noiseLim).repeatP, lim);
  const flag = r.frozen ? 4 : repeatFlag(r.length, needed);
  if (flag === 4) r.frozen = true;
  return { run: r, verdict: flag >= 3 ? { flag, sinceMs: r.startMs } : { flag } };
}

/** The worse of two flat-line verdicts: a 3 or 4 wins, then a pass, then not evaluated. */
export function worseFlat(a: FlatVerdict, b: FlatVerdict): FlatVerdict {
  const bad = (x: FlatVerdict) => x.flag === 3 || x.flag === 4;
  if (bad(a) || bad(b)) {
    if (!bad(b)) return a;
    if (!bad(a)) return b;
    if (a.flag !== b.flag) return a.flag > b.flag ? a : b;
    return (a.sinceMs ?? Infinity) <= (b.sinceMs ?? Infinity) ? a : b;
  }
  return a.flag === 1 || b.flag === 1 ? { flag: 1 } : { flag: 2 };
}
