// Water depth at an ADCP ensemble and the logger-ADCP depth comparison (docs/methods/currents.md 5.3;
// docs/methods/qc.md 7.2 test 9). An ADCP that sends its own pressure has its depth at the ensemble's own time:
// the currents library uses it. One without takes the station's pressure logger, extrapolated to the ensemble
// time from the last two finished bursts (a burst is known only once it is complete, so the burst that covers
// the ensemble is never available when the ensemble is derived). The comparison of the two depths is made only
// where it means something: at earlier ensembles of the ADCP that lie between the centres of two finished
// bursts, where the logger's depth is an interpolation, not an extrapolation or a stale value.
import { series, use, worst, type DeriveContext } from '../derive.js';
import { lowerBound, type Series } from '../series.js';

const MIN = 60_000;
const HOUR = 3_600_000;
/** Finished bursts further back than this are not used for the ensemble's depth. */
const MAX_BURST_AGE_MS = HOUR;
/** Two bursts further apart than this are not joined by a line (a gap in the logger's record). */
const MAX_BURST_SPACING_MS = 90 * MIN;
/** The line through two bursts is followed at most this far beyond the newer one's centre. */
const MAX_EXTRAPOLATION_MS = 45 * MIN;

/** A finished burst: its centre time and mean depth (m), with its flag. */
interface Burst {
  centreMs: number;
  depthM: number;
  flag: number;
}

const usable = (f: number): boolean => f >= 1 && f <= 3;

/** The value of `s` stamped exactly at tMs, or undefined. */
function valueAt(s: Series, tMs: number): number | undefined {
  const i = lowerBound(s, tMs);
  return s.t[i] === tMs ? s.v[i] : undefined;
}

/**
 * The last `n` usable bursts of the station finished at or before `untilMs` and after `sinceMs`, oldest first.
 * `depthDone` and `burstCentre` are written together by the pressure kind, stamped at the burst's end.
 */
function finishedBursts(
  ctx: DeriveContext,
  station: string,
  sinceMs: number,
  untilMs: number,
  n: number,
): Burst[] {
  const done = series(ctx, station, 'depthDone');
  const centre = series(ctx, station, 'burstCentre');
  const out: Burst[] = [];
  for (let i = lowerBound(done, untilMs + 1) - 1; i >= 0 && out.length < n; i--) {
    const doneMs = done.t[i] as number;
    if (doneMs <= sinceMs) break;
    const f = done.f[i] as number;
    const c = valueAt(centre, doneMs);
    if (!usable(f) || c === undefined) continue;
    out.unshift({ centreMs: c, depthM: done.v[i] as number, flag: f });
  }
  return out;
}

/** Linear through two bursts at tMs. */
const line = (a: Burst, b: Burst, tMs: number): number =>
  a.depthM + ((b.depthM - a.depthM) * (tMs - a.centreMs)) / (b.centreMs - a.centreMs);

/**
 * The logger's depth at an ensemble time (m): the line through the last two bursts finished by then, followed
 * at most MAX_EXTRAPOLATION_MS past the newer centre; the last burst alone when there is one. On a spring tide
 * of 1 m range the line is within about 5 cm where the last burst alone can be 15 cm off (docs/methods/currents.md 5.3).
 */
export function loggerDepthAt(
  ctx: DeriveContext,
  station: string,
  tMs: number,
): { depthM: number; flag: number } | undefined {
  const until = Math.min(tMs, ctx.asOfMs);
  const b = finishedBursts(ctx, station, until - MAX_BURST_AGE_MS, until, 2);
  const last = b[b.length - 1];
  if (last === undefined) return undefined;
  use(ctx, { station, v: 'depthDone' });
  const prev = b.length === 2 ? (b[0] as Burst) : undefined;
  if (
    prev === undefined ||
    !(last.centreMs - prev.centreMs <= MAX_BURST_SPACING_MS) ||
    !(last.centreMs > prev.centreMs)
  )
    return { depthM: last.depthM, flag: last.flag };
  const at = Math.min(tMs, last.centreMs + MAX_EXTRAPOLATION_MS);
  return { depthM: line(prev, last, at), flag: worst(prev.flag, last.flag) };
}

/**
 * The ADCP's own depth minus the logger's, m: the mean over the ADCP's earlier ensembles (`adcpDepth`) that lie
 * between the centres of the last two bursts finished by the ensemble's time, where the logger's depth is
 * interpolated. Undefined when there is no such ensemble (no logger, no own pressure, a gap) or the logger has a
 * fault in force.
 */
export function depthDifferenceM(ctx: DeriveContext, station: string, tMs: number): number | undefined {
  // A logger with a fault in force compares nothing (its own fault is flagged where it is used).
  if (!ctx.inputs.healthy({ station, v: 'depthDone' }, tMs)) return undefined;
  const until = Math.min(tMs, ctx.asOfMs);
  const b = finishedBursts(ctx, station, until - 2 * MAX_BURST_AGE_MS, until, 2);
  if (b.length < 2) return undefined;
  const [a, c] = b as [Burst, Burst];
  if (!(c.centreMs > a.centreMs) || c.centreMs - a.centreMs > MAX_BURST_SPACING_MS) return undefined;
  const own = series(ctx, station, 'adcpDepth');
  let sum = 0;
  let n = 0;
  for (let i = lowerBound(own, a.centreMs); i < own.t.length && (own.t[i] as number) <= c.centreMs; i++) {
    if (!usable(own.f[i] as number)) continue;
    sum += (own.v[i] as number) - line(a, c, own.t[i] as number);
    n++;
  }
  return n > 0 ? sum / n : undefined;
}
