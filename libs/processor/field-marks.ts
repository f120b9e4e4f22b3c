// The calibration file at the message level (docs/methods/calibration.md 13.2): a message is corrected before
// its kind derives it (the raw message, and so the raw archive, is never changed), and the records built from a
// corrected value say `calibrated: true`. dispatch.ts applies these at its KindIO and windows.ts to the flux
// records, so no kind module needs to know. (The field logbook's exclusions are sensor faults: faults.ts.)
import { applyCalibration } from '../calibration/index.js';
import type { DerivedRecord, SensorMessage } from '../contract/index.js';
import type { DeriveContext } from './derive.js';
import type { FieldHooks } from './field.js';

export interface MessageMarks {
  /** The message as derived: corrected by the calibration file where an entry is in force. */
  message: SensorMessage;
  /** True when a field of the message was corrected. */
  calibrated: boolean;
}

export function markMessage(ctx: DeriveContext, m: SensorMessage): MessageMarks {
  const table = ctx.field.calibration;
  if (table.size === 0) return { message: m, calibrated: false };
  const applied = applyCalibration(table, ctx.state.reprocess.calibration, m);
  return { message: applied.message, calibrated: applied.calibrated };
}

/**
 * Marks a record a message produced `calibrated: true` when the message or an input series of its kind at its
 * station had a correction in force at its time.
 */
export function markRecord(ctx: DeriveContext, marks: MessageMarks, record: DerivedRecord): void {
  const m = marks.message;
  if (marks.calibrated || ctx.field.inputsCalibratedAt(m.station, m.kind, m.tMs))
    (record as Record<string, unknown>).calibrated = true;
}

/**
 * Marks a flux record of the window [startMs, endMs) `calibrated: true` when one of its input sensors had a
 * correction in force during it or the window before (the storage term).
 */
export function markFluxRecord(
  field: FieldHooks,
  record: DerivedRecord & { transect: string },
  startMs: number,
  endMs: number,
  windowMs: number,
): void {
  if (field.transectCalibrated(record.transect, startMs - windowMs, endMs))
    (record as Record<string, unknown>).calibrated = true;
}
