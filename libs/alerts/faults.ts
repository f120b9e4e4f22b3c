// Sensor-fault state of one series: stale (per sensor, from its observed message interval), and range, flat line
// and spike (per sensor and metric, from the QC tests of libs/qc passed with each observation). Plain JSON data.
// The usual interval and the stale limit are libs/qc's (cadence.ts), shared with the sensor-fault state.

import { INTERVALS_KEPT, staleLimitMs, usualIntervalMs } from '../qc/index.js';

/** Episode of an active fault. */
export interface ActiveFault {
  raisedAtMs: number;
  /** The limit reported at the raise (range faults), repeated on the clear. */
  limit?: number | null;
}

export interface SensorTrack {
  lastMs: number;
  /** The last intervals between messages, ms (at most INTERVALS_KEPT). */
  intervals: number[];
  stale: ActiveFault | null;
  /** Stale limit in force when the stale episode was raised, ms. */
  staleLimitMs: number | null;
}

export { INTERVALS_KEPT, usualIntervalMs, staleLimitMs };

/** Records a message time; intervals across a stale episode are not kept (they are outages, not cadence). */
export function trackMessage(track: SensorTrack, tMs: number): void {
  if (tMs <= track.lastMs) return;
  if (track.stale === null && Number.isFinite(track.lastMs)) {
    track.intervals.push(tMs - track.lastMs);
    if (track.intervals.length > INTERVALS_KEPT) track.intervals.shift();
  }
  track.lastMs = tMs;
}

export interface MetricFaults {
  range: ActiveFault | null;
  /** First observation of the current run without a gross-range fail, ms (for the clear duration). */
  rangeOkSinceMs: number | null;
  flatline: ActiveFault | null;
  spike: ActiveFault | null;
  /** Times of spikes (spike test 3 or 4) inside the counting window, ms. */
  spikeTimes: number[];
}

export const newMetricFaults = (): MetricFaults => ({
  range: null,
  rangeOkSinceMs: null,
  flatline: null,
  spike: null,
  spikeTimes: [],
});
