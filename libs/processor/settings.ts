// The processor's time settings, ms, from the `processing:` section of the configuration.
import type { ReefdConfig } from '../contract/index.js';

const MIN = 60_000;
const HOUR = 3_600_000;

export interface ProcessorTimes {
  /** Flux window length W. */
  windowMs: number;
  /** Flux cadence: a window ends on every tick of this grid. */
  cadenceMs: number;
  /** The watermark trails the newest complete event time by this much. */
  latenessMs: number;
  /**
   * A window waits this long past the watermark: a pressure burst stamped at its start whose centre falls in
   * the window completes (and arrives) up to a burst length after the window's end.
   */
  windowDelayMs: number;
  /** Messages are held this long behind the newest event time and derived in event-time order. */
  reorderMs: number;
  /** Station samples are kept this long behind the watermark. */
  horizonMs: number;
  /** Site samples (met, PAR) are kept this long: the barometer may bridge a gap of baro_max_gap_h. */
  siteHorizonMs: number;
  /** Bottle samples are kept this long: TA from samples reaches back sample_max_age_h. */
  sampleHorizonMs: number;
}

export function processorTimes(config: ReefdConfig): ProcessorTimes {
  const p = config.processing;
  const windowMs = p.window_min * MIN;
  const latenessMs = p.lateness_min * MIN;
  const windowDelayMs = p.window_delay_min * MIN;
  // Three windows (the previous one for storage, the next one for a window held for a centred storage term),
  // the lateness, and the CTD match distance, with a margin.
  const horizonMs = 3 * windowMs + latenessMs + windowDelayMs + p.ctd_match_min * MIN + HOUR;
  return {
    windowMs,
    cadenceMs: p.cadence_min * MIN,
    latenessMs,
    windowDelayMs,
    reorderMs: Math.min(p.reorder_min, p.lateness_min) * MIN,
    horizonMs,
    siteHorizonMs: Math.max(horizonMs, p.baro_max_gap_h * HOUR + HOUR),
    sampleHorizonMs: p.sample_max_age_h * HOUR + horizonMs,
  };
}
