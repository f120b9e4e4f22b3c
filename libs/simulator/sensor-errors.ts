// Calibration errors built into simulated sensors (the calibration tests, docs/methods/calibration.md 13.3):
// a pCO2 sensor reading high, an optode losing gain. The truth rows keep the true values.
import type { Kind } from '../contract/index.js';

/** reported = true x (1 + gainDriftPerDay x d) x gain + offset + driftPerDay x d, d = days since the run's start. */
export interface SensorError {
  /** Message field (default: the kind's main reading: pco2_uatm, the optode's O2 field, temp_c, ...). */
  field?: string;
  /** Constant offset, in the field's unit (default 0). */
  offset?: number;
  /** Offset drift per day (default 0). */
  driftPerDay?: number;
  /** Constant gain (default 1). */
  gain?: number;
  /** Gain change per day (default 0): -0.015 is an optode losing 1.5 % of its reading a day. */
  gainDriftPerDay?: number;
}

const DAY_MS = 86_400_000;

/** The field a sensor error changes by default: the reading a calibration of that kind corrects. */
function mainField(kind: Kind, payload: Record<string, unknown>): string | undefined {
  switch (kind) {
    case 'pco2':
      return 'pco2_uatm';
    case 'oxygen':
      return ['o2_umol_l', 'o2_mg_l', 'o2_sat_pct'].find((f) => typeof payload[f] === 'number');
    case 'ctd':
      return 'temp_c';
    case 'par':
      return 'par_umol_m2_s';
    case 'met':
      return 'baro_hpa';
    default:
      return undefined;
  }
}

/**
 * Applies a sensor's error to its message payload in place, at tMs of a run that started at startMs. Throws for
 * an error naming a field the message does not carry as a number (a mistake in the test, said at once).
 */
export function applySensorError(
  e: SensorError,
  sensorKey: string,
  kind: Kind,
  payload: Record<string, unknown>,
  tMs: number,
  startMs: number,
): void {
  const field = e.field ?? mainField(kind, payload);
  const raw = field === undefined ? undefined : payload[field];
  if (field === undefined || typeof raw !== 'number')
    throw new Error(
      `simulator: sensorErrors.${sensorKey}: the ${kind} message has no numeric field ${field ?? '(give field)'}`,
    );
  const d = (tMs - startMs) / DAY_MS;
  const gain = (e.gain ?? 1) * (1 + (e.gainDriftPerDay ?? 0) * d);
  payload[field] = Math.round((raw * gain + (e.offset ?? 0) + (e.driftPerDay ?? 0) * d) * 1e4) / 1e4;
}
