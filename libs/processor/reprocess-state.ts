// The processor state of reprocessing (docs/methods/calibration.md 13.2, 13.7): what applying the calibration
// file remembers, and the bookkeeping of late lab results re-derived live (revise.ts). Plain JSON data, part of
// the checkpoint. The raw messages a re-derivation replays are not: they are a bounded ring in memory (ring.ts).
import { createCalibrationState, type CalibrationState } from '../calibration/index.js';
import type { SensorMessage } from '../contract/index.js';

export interface ReprocessState {
  /** Each sensor's first sample time, for calibration entries without `from` (libs/calibration). */
  calibration: CalibrationState;
  /** The last revision sent of each re-derived record still within the ring, by record identity (recordKey). */
  revisions: Record<string, number>;
  /** Late lab results waiting for their re-derivation: it runs before the next other message, or at drain. */
  pending: { message: SensorMessage; rxMs: number }[];
}

export function createReprocessState(): ReprocessState {
  return { calibration: createCalibrationState(), revisions: {}, pending: [] };
}
