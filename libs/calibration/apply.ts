// Applying the calibration file to parsed messages (docs/methods/calibration.md 13.2):
//   corrected = (slope + slope_drift_per_day x days) x raw + offset + drift_per_day x days,
// days counted from the entry's `from`, or from the sensor's first sample when it has none. The raw message
// (and so the raw archive) is never changed: a corrected copy is returned.
import type { SensorMessage } from '../contract/index.js';
import type { CalibrationEntry } from './schema.js';

const DAY_MS = 86_400_000;

export interface CompiledCorrection {
  field: string;
  fromMs: number;
  toMs: number;
  /** Whether `from` was given (else days count from the sensor's first sample). */
  anchored: boolean;
  slope: number;
  offset: number;
  driftPerDay: number;
  slopeDriftPerDay: number;
}

/** The calibration file indexed by `<station>/<sensor>`; immutable once built. */
export interface CalibrationTable {
  readonly bySensor: ReadonlyMap<string, readonly CompiledCorrection[]>;
  readonly size: number;
}

/**
 * What applying corrections needs to remember: each sensor's first sample time, for entries without `from`.
 * Plain JSON data, so it can live in the processor's checkpoint.
 */
export interface CalibrationState {
  firstMs: Record<string, number>;
}

export function createCalibrationState(): CalibrationState {
  return { firstMs: {} };
}

export function compileCalibration(entries: readonly CalibrationEntry[]): CalibrationTable {
  const bySensor = new Map<string, CompiledCorrection[]>();
  for (const e of entries) {
    const list = bySensor.get(e.sensor) ?? [];
    list.push({
      field: e.field,
      fromMs: e.from === undefined ? Number.NEGATIVE_INFINITY : Date.parse(e.from),
      toMs: e.to === undefined ? Number.POSITIVE_INFINITY : Date.parse(e.to),
      anchored: e.from !== undefined,
      slope: e.slope,
      offset: e.offset,
      driftPerDay: e.drift_per_day,
      slopeDriftPerDay: e.slope_drift_per_day,
    });
    bySensor.set(e.sensor, list);
  }
  return { bySensor, size: entries.length };
}

/** The corrected value of one reading, `days` after the correction's anchor (never negative). */
export function correctValue(c: CompiledCorrection, raw: number, days: number): number {
  const d = Math.max(0, days);
  return (c.slope + c.slopeDriftPerDay * d) * raw + c.offset + c.driftPerDay * d;
}

/** Days of the correction at tMs, given the sensor's first sample time (for entries without `from`). */
export function daysOf(c: CompiledCorrection, tMs: number, firstMs: number): number {
  return (tMs - (c.anchored ? c.fromMs : firstMs)) / DAY_MS;
}

export interface AppliedCalibration<M> {
  message: M;
  /** True when at least one field was corrected (the records built from it say `calibrated: true`). */
  calibrated: boolean;
  /** The fields corrected. */
  fields: string[];
}

/**
 * Applies every correction of the message's sensor whose range holds the message time. Notes the sensor's
 * first sample in `state` (the only mutation). Fields absent from the message are left absent.
 */
export function applyCalibration<M extends SensorMessage>(
  table: CalibrationTable,
  state: CalibrationState,
  m: M,
): AppliedCalibration<M> {
  const key = `${m.station}/${m.sensor}`;
  const list = table.bySensor.get(key);
  if (list === undefined) return { message: m, calibrated: false, fields: [] };
  const firstMs = (state.firstMs[key] ??= m.tMs);
  let out: Record<string, unknown> | undefined;
  const fields: string[] = [];
  for (const c of list) {
    if (m.tMs < c.fromMs || m.tMs >= c.toMs) continue;
    const raw = (m as unknown as Record<string, unknown>)[c.field];
    const days = daysOf(c, m.tMs, firstMs);
    let value: unknown;
    if (typeof raw === 'number') value = correctValue(c, raw, days);
    else if (Array.isArray(raw))
      value = raw.map((x: unknown) => (typeof x === 'number' ? correctValue(c, x, days) : x));
    else continue;
    out ??= { ...m };
    out[c.field] = value;
    fields.push(c.field);
  }
  if (out === undefined) return { message: m, calibrated: false, fields: [] };
  return { message: out as M, calibrated: true, fields };
}
