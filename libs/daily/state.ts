// Incremental daily state of one transect, for the event-time processor: plain JSON (a checkpoint is
// JSON.stringify), fed one flux window at a time, closing each local day once its last window is final.
// It keeps the windows of the open days and of the six closed days before them (the sliding week), packed as
// tuples with values to 1e-6 of their unit (far below any flux's resolution) so checkpoints stay small; of the
// closed days only the windows a fit can use (the valid ones) are kept.
import { closeDay, type DailyOptions, type DailyResult } from './close-day.js';
import type { LocalCalendar } from './local-day.js';
import { nextDate } from './local-day.js';
import type { FluxWindowInput } from './slots.js';

export const DAILY_STATE_VERSION = 1;
const WEEK_DAYS = 7;

/** [tMs, valid 0|1, ncp, ncpSigma, nec, necSigma, par, omegaAr]: a flux window packed for the state. */
export type PackedWindow = [
  number,
  0 | 1,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
];

const r6 = (x: number | null | undefined): number | null =>
  x === null || x === undefined || !Number.isFinite(x) ? null : Math.round(x * 1e6) / 1e6;

export function packWindow(w: FluxWindowInput): PackedWindow {
  return [
    w.tMs,
    w.valid ? 1 : 0,
    r6(w.ncpMmolM2H),
    r6(w.ncpSigmaMmolM2H),
    r6(w.necMmolM2H),
    r6(w.necSigmaMmolM2H),
    r6(w.parUmolM2S),
    r6(w.omegaAr),
  ];
}

export function unpackWindow(p: PackedWindow): FluxWindowInput {
  const w: FluxWindowInput = {
    tMs: p[0],
    valid: p[1] === 1,
    ncpMmolM2H: p[2],
    ncpSigmaMmolM2H: p[3],
    necMmolM2H: p[4],
    necSigmaMmolM2H: p[5],
    parUmolM2S: p[6],
  };
  if (p[7] !== null) w.omegaAr = p[7];
  return w;
}

export interface DailyState {
  version: number;
  /** Packed flux windows in time order (window centre), one per centre time. */
  windows: PackedWindow[];
  /** The last local day closed (YYYY-MM-DD), or null before the first. */
  lastClosedDay: string | null;
  /** End (ms) of the next day that can close, once known: nothing is due before it (saves calendar work). */
  nextCloseMs?: number;
}

export function createDailyState(): DailyState {
  return { version: DAILY_STATE_VERSION, windows: [], lastClosedDay: null };
}

/** Adds one flux window (a window with the centre time of one already held replaces it). */
export function addWindow(state: DailyState, w: FluxWindowInput): void {
  const ws = state.windows;
  const packed = packWindow(w);
  const n = ws.length;
  if (n === 0 || w.tMs > (ws[n - 1] as PackedWindow)[0]) {
    ws.push(packed);
    return;
  }
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((ws[mid] as PackedWindow)[0] < w.tMs) lo = mid + 1;
    else hi = mid;
  }
  if (ws[lo]?.[0] === w.tMs) ws[lo] = packed;
  else ws.splice(lo, 0, packed);
}

function slice(ws: readonly PackedWindow[], fromMs: number, toMs: number): FluxWindowInput[] {
  return ws.filter((w) => w[0] >= fromMs && w[0] < toMs).map(unpackWindow);
}

/**
 * Closes every local day that ends at or before finalBeforeMs (all windows centred before that time are
 * final; the processor passes the centre of the next window it will compute) and has not been closed.
 * Days before the first window are never closed; a day with no window at all gives no result.
 * Returns the closed days in order and prunes windows older than the sliding week.
 */
export function closeDueDays(
  state: DailyState,
  calendar: LocalCalendar,
  finalBeforeMs: number,
  options: DailyOptions,
): DailyResult[] {
  const out: DailyResult[] = [];
  const first = state.windows[0];
  if (first === undefined) return out;
  if (state.nextCloseMs !== undefined && finalBeforeMs < state.nextCloseMs) return out;
  let day = state.lastClosedDay === null ? calendar.localDate(first[0]) : nextDate(state.lastClosedDay);
  for (;;) {
    const b = calendar.dayBounds(day);
    if (b.endMs > finalBeforeMs) {
      state.nextCloseMs = b.endMs;
      break;
    }
    const dayWindows = slice(state.windows, b.startMs, b.endMs);
    if (dayWindows.length > 0) {
      const weekStart = calendar.dayBounds(nextDate(day, -(WEEK_DAYS - 1))).startMs;
      out.push(closeDay(b, dayWindows, slice(state.windows, weekStart, b.endMs), options));
    }
    state.lastClosedDay = day;
    // Skip ahead over a long silence instead of walking it day by day.
    const next = state.windows.find((w) => w[0] >= b.endMs);
    if (next === undefined) break;
    const nextDay = calendar.localDate(next[0]);
    day = nextDay > nextDate(day) ? nextDay : nextDate(day);
  }
  if (state.lastClosedDay !== null) {
    const keepFrom = calendar.dayBounds(nextDate(state.lastClosedDay, -(WEEK_DAYS - 2))).startMs;
    const closedEnd = calendar.dayBounds(state.lastClosedDay).endMs;
    // Closed days keep what the week's fits use: the valid windows.
    state.windows = state.windows.filter((w) => w[0] >= keepFrom && (w[0] >= closedEnd || w[1] === 1));
  }
  return out;
}
