// Windows held a window late for a centred storage term (docs/methods/metabolism.md 6.1, 6.6). Where O2 turns
// (dawn, dusk) the backward storage term estimates the rate half a window early and dominates the budget, and
// such windows were invalid (`storage_dominates`) most of the time. A window invalid for that reason alone is
// therefore not emitted when it closes: it waits until the next window has closed too, and is computed again
// with the centred difference of its neighbours (note `storage_centred`). Its record comes one window length
// later than the others (30 min by default) and after records of later windows; which windows wait, and what
// they give, depends on the data alone, so live and replay agree. The list of waiting windows is in the state.
import type { ProcessorState } from './state.js';

export interface HeldWindow {
  transect: string;
  endMs: number;
}

/** True for a window record whose only reason to be invalid is its backward storage term. */
export function waitsForCentred(rec: { valid: boolean; invalid_reasons?: string | undefined }): boolean {
  return !rec.valid && rec.invalid_reasons === 'storage_dominates';
}

export function holdWindow(state: ProcessorState, w: HeldWindow): void {
  state.heldWindows.push(w);
}

/** Takes the held windows ending at or before `untilEndMs` out of the state, oldest first (ties by transect). */
export function takeHeldWindows(state: ProcessorState, untilEndMs: number): HeldWindow[] {
  const due = state.heldWindows.filter((w) => w.endMs <= untilEndMs);
  if (due.length === 0) return due;
  state.heldWindows = state.heldWindows.filter((w) => w.endMs > untilEndMs);
  return due.sort(
    (a, b) => a.endMs - b.endMs || (a.transect < b.transect ? -1 : a.transect > b.transect ? 1 : 0),
  );
}
