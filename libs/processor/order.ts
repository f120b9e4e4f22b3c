// Messages within the lateness are held in event-time order (state.held) and derived once the watermark has
// passed them, so the records do not depend on the delivery order within the hold. A message's event time
// here is when it is complete (its kind's `completeMs`: a pressure burst stamped at its start is complete at
// its last sample), the time the watermark and the lateness use.
import type { SensorMessage } from '../contract/index.js';
import { moduleOf } from './dispatch.js';
import { kindModules } from './kinds/index.js';
import type { ProcessorState } from './state.js';

export type Held = ProcessorState['held'][number];

/** When the message is complete, ms: the time it is held, released and counted late by. */
export function completeMs(m: SensorMessage): number {
  return moduleOf(m).completeMs(m);
}

/**
 * Completion time first, then sample time; among messages of the same times the kinds others are paired with
 * go first (each kind's `order`: CTD, barometer, depth), then by station and sensor: the release order is a
 * function of the messages alone.
 */
export function before(x: SensorMessage, y: SensorMessage): boolean {
  const cx = completeMs(x);
  const cy = completeMs(y);
  if (cx !== cy) return cx < cy;
  if (x.tMs !== y.tMs) return x.tMs < y.tMs;
  const kx = kindModules[x.kind].order;
  const ky = kindModules[y.kind].order;
  if (kx !== ky) return kx < ky;
  if (x.station !== y.station) return x.station < y.station;
  return x.sensor < y.sensor;
}

/** Inserts a message at its place in the hold (after the ones it does not precede). */
export function hold(state: ProcessorState, message: SensorMessage, rxMs: number): void {
  const held = state.held;
  let i = held.length;
  while (i > 0 && before(message, (held[i - 1] as Held).message)) i--;
  held.splice(i, 0, { message, rxMs });
}

/** Puts a restored hold in release order (a checkpoint may have held by sample time). Stable. */
export function sortHeld(state: ProcessorState): void {
  const held = state.held;
  for (let i = 1; i < held.length; i++) {
    const h = held[i] as Held;
    let j = i;
    while (j > 0 && before(h.message, (held[j - 1] as Held).message)) j--;
    if (j < i) held.splice(j, 0, ...held.splice(i, 1));
  }
}

/** Takes the held messages complete by `untilMs` out of the hold, in order. */
export function takeDue(state: ProcessorState, untilMs: number): Held[] {
  const held = state.held;
  let n = 0;
  while (n < held.length && completeMs((held[n] as Held).message) <= untilMs) n++;
  return n === 0 ? [] : held.splice(0, n);
}
