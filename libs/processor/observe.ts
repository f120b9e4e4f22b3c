// QC and alerts of the values a message carries or produces: each value through its libs/qc state (one per
// station/sensor/variable, in the checkpoint), then the alert engine; each emitted record's numeric fields as
// `<type>.<field>` metrics, about the record's subject (station or transect) as the record-type table says.
import { RECORD_TYPE_SPECS, type DerivedRecord } from '../contract/index.js';
import type { AlertEngine, AlertRecord } from '../alerts/index.js';
import { createQcState, qcUpdate, type QcResult, type QcState } from '../qc/index.js';
import type { FaultWiring } from './faults.js';
import type { ProcessorState } from './state.js';

/** The alert engine's records are contract `alert` records (with `id` and `severity` of our own). */
export const alertRecord = (a: AlertRecord): DerivedRecord => ({ ...a }) as DerivedRecord;

/** Where a value comes from: the sensor, its kind and its sample time. */
export interface ValueSource {
  station: string;
  sensor: string;
  kind: string;
  tMs: number;
}

/**
 * A QC'd value: its QC flag, the flag the alert engine saw (the worse of QC's and `flagIn`), and the time of the
 * sensor's previous value when its QC failed that one only now (a spike verdict comes one sample late).
 */
export interface QcVerdict {
  qcFlag: number;
  flag: number;
  previousFailedMs: number | undefined;
}

export interface Observer {
  /**
   * QC of `value` as `variable`, then the sensor-fault state (unless `faults` is false: the supply voltage has
   * its own rule), then the alert engine under `metric`; the flag is the worse of QC's and `flagIn`. Alert
   * records go to `out`.
   */
  qc(
    src: ValueSource,
    metric: string,
    variable: string,
    value: number,
    rxMs: number,
    out: DerivedRecord[],
    flagIn?: number,
    faults?: boolean,
  ): QcVerdict;
  /** The alert engine only (no QC). Returns `flag`. */
  alert(src: ValueSource, metric: string, value: number, flag: number, out: DerivedRecord[]): number;
  /** Every numeric field of a record but `flag`, as `<type>.<field>`, at tMs with `flag`. */
  record(r: DerivedRecord, sensor: string | undefined, tMs: number, flag: number, out: DerivedRecord[]): void;
}

/** The id of what a record is about: its station or its transect (record-types.ts `subject`). */
export function recordSubject(r: DerivedRecord): string {
  const v = (r as Record<string, unknown>)[RECORD_TYPE_SPECS[r.type].subject];
  return typeof v === 'string' ? v : '';
}

export function createObserver(state: ProcessorState, alerts: AlertEngine, wiring?: FaultWiring): Observer {
  function qcOf(src: ValueSource, variable: string, value: number, rxMs: number): QcResult {
    const key = `${src.station}/${src.sensor}/${variable}`;
    let q = state.qc[key] as QcState | undefined;
    if (q === undefined) {
      q = createQcState(variable);
      state.qc[key] = q;
    }
    return qcUpdate(q, src.tMs, value, rxMs);
  }

  return {
    qc(src, metric, variable, value, rxMs, out, flagIn = 1, faults = true) {
      const r = qcOf(src, variable, value, rxMs);
      const previousFailedMs = faults && wiring !== undefined ? wiring.onQc(src, variable, r) : undefined;
      const info = flagIn > r.flag ? { ...r, flag: flagIn } : r;
      for (const a of alerts.observe(metric, src.station, src.sensor, src.tMs, value, info))
        out.push(alertRecord(a));
      return { qcFlag: r.flag, flag: info.flag, previousFailedMs };
    },
    alert(src, metric, value, flag, out) {
      for (const a of alerts.observe(metric, src.station, src.sensor, src.tMs, value, flag))
        out.push(alertRecord(a));
      return flag;
    },
    record(r, sensor, tMs, flag, out) {
      const subject = recordSubject(r);
      for (const [k, v] of Object.entries(r)) {
        if (typeof v !== 'number' || k === 'flag') continue;
        for (const a of alerts.observe(`${r.type}.${k}`, subject, sensor, tMs, v, flag))
          out.push(alertRecord(a));
      }
    },
  };
}
