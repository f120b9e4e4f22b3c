// The per-sensor view: for every configured sensor its last values with units, expected and actual reporting
// interval, QC flag and its reason, active faults and since when, battery and its trend, and the calibration
// and field-log entries that concern it. Built from what the daemon exposes today, through one small input
// (`SensorHealthRow`, the processor's `sensorHealth()`): the adapter learns intervals and the battery trend
// by watching those rows change as records arrive. A richer per-sensor fault state (learned interval, fault
// onset, QC test names) replaces the estimates here field by field when the processor offers it.
import { alertsConfigSchema, resolveRules } from '../../libs/alerts/index.js';
import { RECORD_TYPE_SPECS, type DerivedRecord, type ReefdConfig } from '../../libs/contract/index.js';
import type { AlertView, FieldLog, SensorState, SensorView } from './api-schemas.js';
import { entriesFor } from './field-log.js';
import { metricInfo } from './units.js';

/** One sensor's health as the processor reports it (libs/processor `sensorHealth()`). */
export interface SensorHealthRow {
  station: string;
  sensor: string;
  kind: string;
  /** Sample time of the newest message, ms (0: none yet). */
  lastSeenMs: number;
  batteryV: number | null;
  /** Worst QARTOD flag of what the last message produced. */
  flag: number | null;
}

const MIN_MS = 60_000;
const HOUR_MS = 3_600_000;
const GAPS_KEPT = 15; // the stale rule's "usual interval" is the median of the last 15 (libs/alerts README)
/** Supply voltages kept per sensor: one per 10 min over 24 h (the trend reads the last 12 h). */
const BATTERY_POINTS = 144;
const BATTERY_SPACING_MS = 10 * MIN_MS;
const TREND_SPAN_MS = 12 * HOUR_MS;

interface Track {
  lastSeenMs: number;
  batteryV: number | null;
  flag: number | null;
  gapsMs: number[];
  /** Supply voltage history: event time, volts (ring, oldest first). */
  batteryT: number[];
  batteryV2: number[];
  lastRecord?: DerivedRecord;
}

const median = (xs: readonly number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
};

/** Least-squares slope of volts against time over the last TREND_SPAN_MS, V per day (null: too little data). */
export function batteryTrendVPerDay(tMs: readonly number[], v: readonly number[]): number | null {
  const end = tMs.at(-1);
  if (end === undefined) return null;
  let n = 0;
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let sxy = 0;
  let first = end;
  for (let i = tMs.length - 1; i >= 0 && (tMs[i] as number) >= end - TREND_SPAN_MS; i--) {
    const x = ((tMs[i] as number) - end) / 86_400_000;
    const y = v[i] as number;
    n++;
    sx += x;
    sy += y;
    sxx += x * x;
    sxy += x * y;
    first = tMs[i] as number;
  }
  if (n < 4 || end - first < HOUR_MS) return null;
  const den = n * sxx - sx * sx;
  return den > 0 ? (n * sxy - sx * sy) / den : null;
}

/** Numeric contract fields of a record type that a person reads as "the value" (no sigmas, flags, counts). */
function valueFields(type: string): string[] {
  const spec = (RECORD_TYPE_SPECS as Record<string, { fields: Record<string, { kind: string }> }>)[type];
  if (!spec) return [];
  return Object.entries(spec.fields)
    .filter(([k, f]) => f.kind === 'number' && k !== 'flag' && !k.includes('sigma') && k !== 'bins_used')
    .map(([k]) => k);
}

export interface SensorWatchOptions {
  config: ReefdConfig;
  /** The processor's per-sensor rows (undefined: the dashboard only knows the records). */
  health?: (() => readonly SensorHealthRow[]) | undefined;
  /** Least wall time between two reads of `health` while records stream in (default 250 ms). */
  minPollMs?: number;
  wallClock?: () => number;
}

export class SensorWatch {
  readonly #config: ReefdConfig;
  readonly #health: (() => readonly SensorHealthRow[]) | undefined;
  readonly #minPollMs: number;
  readonly #wall: () => number;
  readonly #tracks = new Map<string, Track>();
  readonly #batteryLimit = new Map<string, number>();
  #lastPollWallMs = Number.NEGATIVE_INFINITY;

  constructor(o: SensorWatchOptions) {
    this.#config = o.config;
    this.#health = o.health;
    this.#minPollMs = o.minPollMs ?? 250;
    this.#wall = o.wallClock ?? Date.now;
    const rules = resolveRules(o.config.alerts ?? alertsConfigSchema.parse({}));
    for (const r of rules.thresholds)
      if (r.fault === 'battery' && !r.stations && !r.sensors)
        this.#batteryLimit.set(r.metric.split('.')[0] as string, r.limit);
    for (const [station, st] of Object.entries(o.config.stations))
      for (const sensor of Object.keys(st.sensors)) this.#tracks.set(`${station}/${sensor}`, newTrack());
  }

  /** Notes the records of a batch (last values, QC reasons) and reads the processor's rows if due. */
  observe(records: readonly DerivedRecord[]): void {
    for (const r of records) {
      if (r.type === 'alert') continue;
      const sensor = (r as { sensor?: unknown }).sensor;
      if (typeof sensor === 'string' && r.station !== undefined) {
        const tr = this.#tracks.get(`${r.station}/${sensor}`);
        if (tr && (tr.lastRecord === undefined || tr.lastRecord.t <= r.t)) tr.lastRecord = r;
      }
    }
    if (this.#wall() - this.#lastPollWallMs >= this.#minPollMs) this.poll();
  }

  /** Reads the processor's rows: new messages give gaps, new voltages give the battery history. */
  poll(): void {
    this.#lastPollWallMs = this.#wall();
    if (!this.#health) return;
    for (const h of this.#health()) {
      const tr = this.#tracks.get(`${h.station}/${h.sensor}`);
      if (tr === undefined || !(h.lastSeenMs > 0)) continue;
      if (h.lastSeenMs > tr.lastSeenMs) {
        if (tr.lastSeenMs > 0) {
          tr.gapsMs.push(h.lastSeenMs - tr.lastSeenMs);
          if (tr.gapsMs.length > GAPS_KEPT) tr.gapsMs.shift();
        }
        tr.lastSeenMs = h.lastSeenMs;
        if (h.batteryV !== null && Number.isFinite(h.batteryV)) {
          const lastT = tr.batteryT.at(-1);
          if (lastT === undefined || h.lastSeenMs - lastT >= BATTERY_SPACING_MS) {
            tr.batteryT.push(h.lastSeenMs);
            tr.batteryV2.push(h.batteryV);
            if (tr.batteryT.length > BATTERY_POINTS) {
              tr.batteryT.shift();
              tr.batteryV2.shift();
            }
          }
        }
      }
      tr.batteryV = h.batteryV;
      tr.flag = h.flag;
    }
  }

  /** The view of every configured sensor. */
  views(raised: readonly AlertView[], log: FieldLog): SensorView[] {
    const faultsBy = new Map<string, AlertView[]>();
    for (const a of raised) {
      if (a.class !== 'fault' || a.sensor === null || a.station === null) continue;
      const k = `${a.station}/${a.sensor}`;
      faultsBy.set(k, [...(faultsBy.get(k) ?? []), a]);
    }
    const out: SensorView[] = [];
    for (const [station, st] of Object.entries(this.#config.stations)) {
      for (const [sensor, sc] of Object.entries(st.sensors)) {
        const key = `${station}/${sensor}`;
        const tr = this.#tracks.get(key) ?? newTrack();
        out.push(this.#view(station, sensor, sc, tr, faultsBy.get(key) ?? [], log));
      }
    }
    return out;
  }

  #view(
    station: string,
    sensor: string,
    sc: ReefdConfig['stations'][string]['sensors'][string],
    tr: Track,
    faults: AlertView[],
    log: FieldLog,
  ): SensorView {
    const expected =
      sc.interval_s !== undefined
        ? { s: sc.interval_s, source: 'configured' as const }
        : tr.gapsMs.length >= 3
          ? { s: median(tr.gapsMs) / 1000, source: 'usual' as const }
          : { s: null, source: 'none' as const };
    const limit = this.#batteryLimit.get(sc.kind) ?? null;
    const trend = batteryTrendVPerDay(tr.batteryT, tr.batteryV2);
    const hoursLeft =
      trend !== null && trend < 0 && tr.batteryV !== null && limit !== null
        ? Math.max(0, ((tr.batteryV - limit) / -trend) * 24)
        : null;
    const rec = this.#lastValuesRecord(station, sc.kind, tr);
    const reason = rec ? qcReason(rec) : null;
    const flag = tr.flag ?? (rec ? numOrNull((rec as { flag?: unknown }).flag) : null);
    const { state, why } = classify({
      enabled: sc.enabled,
      seen: tr.lastSeenMs > 0 || rec !== undefined,
      faults,
      flag,
      reason,
    });
    const entries = entriesFor(log, station, sensor);
    const stride = Math.max(1, Math.ceil(tr.batteryT.length / 96));
    return {
      station,
      sensor,
      kind: sc.kind,
      label: sc.label ?? sensor,
      state,
      state_reason: why,
      last_seen: tr.lastSeenMs > 0 ? new Date(tr.lastSeenMs).toISOString() : (rec?.t ?? null),
      expected_interval_s: expected.s,
      expected_source: expected.source,
      last_gap_s: tr.gapsMs.length ? (tr.gapsMs.at(-1) as number) / 1000 : null,
      qc_flag: flag,
      qc_reason: reason,
      faults: faults.map((a) => ({
        id: a.id,
        fault: a.fault ?? a.rule,
        field: a.metric !== null ? (a.metric.split('.')[1] ?? null) : null,
        rule: a.rule,
        since: a.raised_t,
        value: a.value,
        limit: a.limit,
        unit: a.unit,
      })),
      battery_v: tr.batteryV,
      battery_limit_v: limit,
      battery_trend_v_per_day: trend,
      battery_hours_left: hoursLeft,
      battery_series: tr.batteryT.flatMap((t, i): [string, number][] =>
        i % stride === 0 || i === tr.batteryT.length - 1
          ? [[new Date(t).toISOString(), tr.batteryV2[i] as number]]
          : [],
      ),
      last_values: rec ? lastValues(rec, sc.kind) : [],
      calibrations: entries.calibrations,
      logbook: entries.logbook,
    };
  }

  /** The record whose values are this sensor's: its own, or for a CTD the station's carbonate record. */
  #lastValuesRecord(station: string, kind: string, tr: Track): DerivedRecord | undefined {
    if (tr.lastRecord) return tr.lastRecord;
    if (kind !== 'ctd') return undefined;
    let best: DerivedRecord | undefined;
    for (const [key, t] of this.#tracks)
      if (
        key.startsWith(`${station}/`) &&
        t.lastRecord?.type === 'carbonate' &&
        (!best || best.t < t.lastRecord.t)
      )
        best = t.lastRecord;
    return best;
  }
}

function newTrack(): Track {
  return { lastSeenMs: 0, batteryV: null, flag: null, gapsMs: [], batteryT: [], batteryV2: [] };
}

const numOrNull = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function qcReason(r: DerivedRecord): string | null {
  const x = r as { reason?: unknown; invalid_reasons?: unknown };
  if (typeof x.reason === 'string' && x.reason !== '') return x.reason;
  if (typeof x.invalid_reasons === 'string' && x.invalid_reasons !== '') return x.invalid_reasons;
  return null;
}

/** What each kind of sensor measures itself: listed first, before what was derived from it. */
const MEASURED: Readonly<Record<string, readonly string[]>> = {
  ctd: ['temp_c', 'sal'],
  oxygen: ['o2_mg_l', 'o2_sat_pct'],
  pco2: ['pco2_uatm'],
  pressure: ['depth_m', 'hm0_m', 'tp_s'],
  adcp: ['speed_m_s', 'dir_to_deg'],
  par: ['par_umol_m2_s'],
};

function lastValues(r: DerivedRecord, kind: string): SensorView['last_values'] {
  // A CTD's own values reach the records as the temperature and salinity of the carbonate solution.
  const own = MEASURED[kind] ?? [];
  const fields = kind === 'ctd' ? own : [...own, ...valueFields(r.type).filter((f) => !own.includes(f))];
  const out: SensorView['last_values'] = [];
  for (const f of fields) {
    const v = (r as Record<string, unknown>)[f];
    if (v === undefined) continue;
    const m = metricInfo(`${r.type}.${f}`);
    out.push({ field: f, value: numOrNull(v), unit: m.unit, label: m.label, t: r.t });
  }
  return out;
}

const FAILING_FAULTS = new Set(['flatline', 'range', 'battery']);
const SILENT_FAULTS = new Set(['stale', 'silent']);

function classify(o: {
  enabled: boolean;
  seen: boolean;
  faults: readonly AlertView[];
  flag: number | null;
  reason: string | null;
}): { state: SensorState; why: string } {
  if (!o.enabled) return { state: 'disabled', why: 'switched off in the configuration' };
  // The battery trend warning (rule battery_trend, fault battery) says the supply will fail: still working.
  const names = o.faults.map((f) => (f.rule === 'battery_trend' ? 'battery_trend' : (f.fault ?? f.rule)));
  const silent = names.find((f) => SILENT_FAULTS.has(f));
  if (silent) return { state: 'silent', why: silent };
  const failing = names.find((f) => FAILING_FAULTS.has(f));
  if (failing) return { state: 'failing', why: failing };
  if (!o.seen) return { state: 'unknown', why: 'no message yet' };
  // A reading that fails QC without a fault behind it (too few good bins at low tide, a tilted head) says the
  // data are unusable now, not that the instrument broke: someone should look, so "suspect".
  if (names.length > 0) return { state: 'suspect', why: names[0] as string };
  if (o.flag === 4) return { state: 'suspect', why: o.reason ?? 'qc_fail' };
  if (o.flag === 3) return { state: 'suspect', why: o.reason ?? 'qc_suspect' };
  return { state: 'ok', why: 'ok' };
}
