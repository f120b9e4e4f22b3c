// Alert records (docs/contract-v1.md section 4, type `alert`) and the engine's internal rule shapes.

import type { Severity } from '../contract/index.js';

export type FaultName = 'stale' | 'flatline' | 'range' | 'spike' | 'battery' | 'silent';
export type AlertClass = 'threshold' | 'fault';
export type AlertState = 'raised' | 'cleared';

/**
 * One alert transition. Contract fields: type, site, t, station, rule, class, state, value, limit, metric?, fault?,
 * sensor?. Our extensions: id (same for the raise and the clear of one episode), severity, raised_t (on clears).
 * `value`/`limit` are null only when unknown (e.g. a range fault whose sensor limits were not passed in).
 */
export interface AlertRecord {
  type: 'alert';
  site: string;
  /** ISO 8601 UTC event time of the transition. */
  t: string;
  /** Absent on a site-wide alert (`site_silent`). */
  station?: string;
  rule: string;
  class: AlertClass;
  state: AlertState;
  value: number | null;
  limit: number | null;
  metric?: string;
  fault?: FaultName;
  sensor?: string;
  id: string;
  severity: Severity;
  /** On a cleared record: when the episode was raised. */
  raised_t?: string;
}

/** A resolved threshold rule (built-in, user or per-kind battery rule). Durations in ms. */
export interface ThresholdRule {
  readonly id: string;
  readonly metric: string;
  readonly class: AlertClass;
  readonly fault?: FaultName;
  readonly dir: 'below' | 'above';
  readonly limit: number;
  readonly clear: number;
  readonly raiseAfterMs: number;
  readonly clearAfterMs: number;
  readonly maxGapMs: number;
  readonly severity: Severity;
  readonly ignoreSuspect: boolean;
  readonly stations?: readonly string[];
  readonly sensors?: readonly string[];
}

/** QC information an observation may carry: a bare flag or a QC result of libs/qc (structurally). */
export interface QcInfo {
  readonly flag: number;
  readonly tests?: Readonly<Partial<Record<string, number>>>;
  readonly finalizedPrevious?: {
    readonly tMs: number;
    readonly flag: number;
    readonly tests: Readonly<Partial<Record<string, number>>>;
  };
  /** Sensor (fail) limits, to report in a range fault; default the libs/qc defaults of the metric's field. */
  readonly limits?: { readonly min?: number; readonly max?: number };
}
