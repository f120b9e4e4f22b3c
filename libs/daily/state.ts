// Incremental daily state of one transect, for the event-time processor: plain JSON (a checkpoint is
// JSON.stringify), fed one flux window at a time, closing each local day once its last window is final.
// It keeps the windows of the open days and of the six closed days before them (the sliding week).
import { closeDay, type DailyOptions, type DailyResult } from './close-day.js';
import type { LocalCalendar } from './local-day.js';
import { nextDate } from './local-day.js';
import type { FluxWindowInput } from './slots.js';

export const DAILY_STATE_VERSION = 1;
const WEEK_DAYS = 7;

export interface DailyState {
  version: number;
  /** Flux windows in time order (window centre), one per centre time. */
  windows: FluxWindowInput[];
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
  const copy: FluxWindowInput = {
    tMs: w.tMs,
    valid: w.valid,
    ncpMmolM2H: w.ncpMmolM2H,
    ncpSigmaMmolM2H: w.ncpSigmaMmolM2H,
    necMmolM2H: w.necMmolM2H,
    necSigmaMmolM2H: w.necSigmaMmolM2H,
    parUmolM2S: w.parUmolM2S,
    ...(w.omegaAr !== undefined ? { omegaAr: w.omegaAr } : {}),
  };
  const n = ws.length;
  if (n === 0 || w.tMs > (ws[n - 1] as FluxWindowInput).tMs) {
    ws.push(copy);
    return;
  }
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((ws[mid] as FluxWindowInput).tMs < w.tMs) lo = mid + 1;
    else hi = mid;
  }
  if (ws[lo]?.tMs === w.tMs) ws[lo] = copy;
  else ws.splice(lo, 0, copy);
}

function slice(ws: readonly FluxWindowInput[], fromMs: number, toMs: number): FluxWindowInput[] {
  return ws.filter((w) => w.tMs >= fromMs && w.tMs < toMs);
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
  let day = state.lastClosedDay === null ? calendar.localDate(first.tMs) : nextDate(state.lastClosedDay);
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
    const next = state.windows.find((w) => w.tMs >= b.endMs);
    if (next === undefined) break;
    const nextDay = calendar.localDate(next.tMs);
    day = nextDay > nextDate(day) ? nextDay : nextDate(day);
  }
  if (state.lastClosedDay !== null) {
    const keepFrom = calendar.dayBounds(nextDate(state.lastClosedDay, -(WEEK_DAYS - 2))).startMs;
    const i = state.windows.findIndex((w) => w.tMs >= keepFrom);
    state.windows.splice(0, i < 0 ? state.windows.length : i);
  }
  return out;
}
