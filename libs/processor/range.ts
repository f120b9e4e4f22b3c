// Which messages a range of event time needs (docs/methods/calibration.md 13.7): `reefd replay --from/--to` and
// the live re-derivation of late lab results (revise.ts) process the messages of [from - warm-up, to + closing)
// so that the records in [from, to) equal those of a full run. Before `from`: the processor's history horizon
// (two windows, the window delay, the lateness and the CTD match) plus 6 h for the QC tests' flat-line windows;
// bottles up to sample_max_age_h (TA carried from the last bottle). After `to`: a window, its delay and the
// lateness, so every window before `to` closes.
import type { ReefdConfig, SensorMessage } from '../contract/index.js';

const MIN = 60_000;

export interface RangeMargins {
  /** History a record at `from` reads, ms. */
  warmMs: number;
  /** History of bottle samples (sample kind) a record at `from` reads, ms. */
  sampleWarmMs: number;
  /** Data past `to` that closes the windows before it, ms. */
  tailMs: number;
}

export function rangeMargins(config: ReefdConfig): RangeMargins {
  const p = config.processing;
  const warmMs = (2 * p.window_min + p.window_delay_min + p.lateness_min + p.ctd_match_min + 360) * MIN;
  return {
    warmMs,
    sampleWarmMs: Math.max(warmMs, p.sample_max_age_h * 60 * MIN),
    tailMs: (p.window_min + p.window_delay_min + p.lateness_min) * MIN,
  };
}

/** True for a message a range [fromMs, toMs) needs (either bound may be infinite). */
export function inRangeWithMargins(
  margins: RangeMargins,
  fromMs: number,
  toMs: number,
): (m: SensorMessage) => boolean {
  return (m) =>
    m.tMs >= fromMs - (m.kind === 'sample' ? margins.sampleWarmMs : margins.warmMs) &&
    m.tMs < toMs + margins.tailMs;
}
