// Messages within the lateness are held in event-time order (state.held) and derived once the watermark has
// passed them, so the records do not depend on the delivery order within the hold.
import type { SensorMessage } from '../contract/index.js';
import { kindModules } from './kinds/index.js';
import type { ProcessorState } from './state.js';

export type Held = ProcessorState['held'][number];

/**
 * Event time first; among messages of the same time the kinds others are paired with go first (each kind's
 * `order`: CTD, barometer, depth), then by station and sensor: the release order is a function of the
 * messages alone.
 */
export function before(x: SensorMessage, y: SensorMessage): boolean {
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

/** Takes the held messages with event time up to `untilMs` out of the hold, in order. */
export function takeDue(state: ProcessorState, untilMs: number): Held[] {
  const held = state.held;
  let n = 0;
  while (n < held.length && (held[n] as Held).message.tMs <= untilMs) n++;
  return n === 0 ? [] : held.splice(0, n);
}
