// The alert engine: a deterministic state machine on event time (docs/methods/conventions.md 1.5;
// docs/methods/alerts.md 8; docs/contract-v1.md section 4). observe() feeds one metric value with its QC,
// advance() moves the watermark for stale detection; both return the alert records of the transitions they
// cause. All state is plain JSON (snapshot/restore), so a restart resumes mid-episode with no second raise
// and no lost clear.

import { DEFAULT_QC_LIMITS } from '../qc/index.js';
import { alertsConfigSchema, type AlertsConfigInput } from './config-schema.js';
import {
  newMetricFaults,
  staleLimitMs,
  trackMessage,
  type MetricFaults,
  type SensorTrack,
} from './faults.js';
import { alertId } from './id.js';
import { inScope, resolveRules, type ResolvedRules } from './rules.js';
import { newThresholdSeries, stepThreshold, type ThresholdSeries } from './threshold.js';
import type { AlertRecord, FaultName, QcInfo, ThresholdRule } from './types.js';

export interface EngineSnapshot {
  v: 1;
  site: string;
  watermarkMs: number | null;
  thresholds: Record<string, ThresholdSeries>;
  metrics: Record<string, MetricFaults>;
  sensors: Record<string, SensorTrack>;
}

export interface AlertEngine {
  /** The rules in force (built-ins after overrides, per-kind battery rules, user rules). */
  readonly rules: ResolvedRules;
  /**
   * One observation: `metric` is `<kind or record type>.<field>` (e.g. `oxygen.o2_mg_l`, `ctd.temp_c`),
   * `flag` a QARTOD flag or a libs/qc result (its tests drive the range, flat-line and spike faults). Values
   * flagged 4 or 9, and non-finite values, never raise or clear a threshold; messages with a sensor feed the
   * stale tracker whatever their flag.
   */
  observe(
    metric: string,
    station: string,
    sensor: string | undefined,
    tMs: number,
    value: number,
    flag: number | QcInfo,
  ): AlertRecord[];
  /** Moves the event-time watermark (ms); raises `stale` for sensors silent past their limit. */
  advance(watermarkMs: number): AlertRecord[];
  /** Deep copy of the state as plain JSON-serialisable data. */
  snapshot(): EngineSnapshot;
  /** Replaces the state with a snapshot (throws REEFD_ALERTS_BAD_SNAPSHOT on a wrong version or site). */
  restore(snapshot: EngineSnapshot): void;
  /** Episodes raised and not yet cleared, as their raise records. */
  active(): AlertRecord[];
}

const iso = (ms: number): string => new Date(ms).toISOString();
/** Event-time step of the stale check, ms. */
const STALE_STEP_MS = 15_000;
const sep = '\u001f'; // keys join ids that match [A-Za-z0-9_.-]; the unit separator cannot occur in them

/** Creates an engine for one site. `config` is the `alerts:` section (raw or already parsed; parsed again). */
export function createAlertEngine(config: AlertsConfigInput | undefined, site: string): AlertEngine {
  const parsed = alertsConfigSchema.safeParse(config ?? {});
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw new Error(
      `REEFD_ALERTS_BAD_CONFIG: alerts.${first?.path.join('.') ?? ''}: ${first?.message ?? 'invalid'}; ` +
        'fix the alerts: section (see libs/alerts/README.md)',
    );
  }
  const rules = resolveRules(parsed.data);
  let st: EngineSnapshot = { v: 1, site, watermarkMs: null, thresholds: {}, metrics: {}, sensors: {} };

  const base = (
    rule: string,
    cls: AlertRecord['class'],
    state: AlertRecord['state'],
    station: string,
    tMs: number,
    key: string,
    raisedAtMs: number,
    value: number | null,
    limit: number | null,
    severity: AlertRecord['severity'],
    extra: { metric?: string | undefined; fault?: FaultName | undefined; sensor?: string | undefined },
  ): AlertRecord => {
    const rec: AlertRecord = {
      type: 'alert',
      site,
      t: iso(tMs),
      station,
      rule,
      class: cls,
      state,
      value: value !== null && Number.isFinite(value) ? value : null,
      limit: limit !== null && Number.isFinite(limit) ? limit : null,
      id: alertId(`${site}${sep}${key}`, raisedAtMs),
      severity,
    };
    if (extra.metric !== undefined) rec.metric = extra.metric;
    if (extra.fault !== undefined) rec.fault = extra.fault;
    if (extra.sensor !== undefined) rec.sensor = extra.sensor;
    if (state === 'cleared') rec.raised_t = iso(raisedAtMs);
    return rec;
  };

  const thresholdKey = (r: ThresholdRule, station: string, sensor: string | undefined): string =>
    [r.id, r.metric, station, sensor ?? ''].join(sep);

  function observeThresholds(
    metric: string,
    station: string,
    sensor: string | undefined,
    tMs: number,
    value: number,
    flag: number,
    out: AlertRecord[],
  ): void {
    for (const r of rules.thresholds) {
      if (r.metric !== metric || !inScope(r, station, sensor)) continue;
      if (flag === 3 && r.ignoreSuspect) continue;
      const key = thresholdKey(r, station, sensor);
      const s = (st.thresholds[key] ??= newThresholdSeries());
      if (s.lastObsMs !== null && tMs <= s.lastObsMs) continue; // late or repeated: event order only
      const tr = stepThreshold(s, r, tMs, value);
      if (tr === null) continue;
      const raisedAt = s.raisedAtMs ?? tMs;
      out.push(
        base(
          r.id,
          r.class,
          tr,
          station,
          tMs,
          key,
          raisedAt,
          value,
          tr === 'raised' ? r.limit : r.clear,
          r.severity,
          {
            metric,
            fault: r.fault,
            sensor,
          },
        ),
      );
      if (tr === 'cleared') s.raisedAtMs = null;
    }
  }

  function observeFaults(
    metric: string,
    station: string,
    sensor: string | undefined,
    tMs: number,
    value: number,
    qc: QcInfo,
    out: AlertRecord[],
  ): void {
    const f = rules.faults;
    const key = [metric, station, sensor ?? ''].join(sep);
    const m = (st.metrics[key] ??= newMetricFaults());
    const emit = (
      fault: FaultName,
      state: AlertRecord['state'],
      raisedAt: number,
      atMs: number,
      v: number | null,
      limit: number | null,
      sev: AlertRecord['severity'],
    ): void => {
      out.push(
        base(fault, 'fault', state, station, atMs, `${fault}${sep}${key}`, raisedAt, v, limit, sev, {
          metric,
          fault,
          sensor,
        }),
      );
    };
    const tests = qc.tests ?? {};

    if (f.range.enabled && inScope(f.range, station, sensor) && tests.gross_range !== undefined) {
      if (tests.gross_range === 4) {
        m.rangeOkSinceMs = null;
        if (m.range === null) {
          const lim = qc.limits ?? DEFAULT_QC_LIMITS[metric.slice(metric.indexOf('.') + 1)]?.sensor;
          const limit =
            lim === undefined ? null : lim.min !== undefined && value < lim.min ? lim.min : (lim.max ?? null);
          m.range = { raisedAtMs: tMs, limit };
          emit('range', 'raised', tMs, tMs, value, limit, f.range.severity);
        }
      } else if (m.range !== null) {
        m.rangeOkSinceMs ??= tMs;
        if (tMs - m.rangeOkSinceMs >= f.range.clearAfterMs) {
          emit('range', 'cleared', m.range.raisedAtMs, tMs, value, m.range.limit ?? null, f.range.severity);
          m.range = null;
          m.rangeOkSinceMs = null;
        }
      }
    }

    if (f.flatline.enabled && inScope(f.flatline, station, sensor) && tests.flat_line !== undefined) {
      const fl = tests.flat_line;
      if (fl >= f.flatline.minFlag && fl !== 9 && m.flatline === null) {
        m.flatline = { raisedAtMs: tMs };
        emit('flatline', 'raised', tMs, tMs, value, f.flatline.minFlag, f.flatline.severity);
      } else if (fl === 1 && m.flatline !== null) {
        emit(
          'flatline',
          'cleared',
          m.flatline.raisedAtMs,
          tMs,
          value,
          f.flatline.minFlag,
          f.flatline.severity,
        );
        m.flatline = null;
      }
    }

    if (f.spike.enabled && inScope(f.spike, station, sensor)) {
      // The spike flag is final only for the previous sample (libs/qc: provisional until V_{n+1}).
      const fin = qc.finalizedPrevious;
      const sp = fin?.tests.spike;
      if (fin !== undefined && sp !== undefined && sp >= f.spike.minFlag && sp !== 9)
        m.spikeTimes.push(fin.tMs);
      m.spikeTimes = m.spikeTimes
        .filter((x) => x > tMs - f.spike.windowMs)
        .slice(-Math.max(f.spike.count, 1) * 4);
      const n = m.spikeTimes.length;
      if (m.spike === null && n >= f.spike.count) {
        m.spike = { raisedAtMs: tMs };
        emit('spike', 'raised', tMs, tMs, n, f.spike.count, f.spike.severity);
      } else if (m.spike !== null && n === 0) {
        emit('spike', 'cleared', m.spike.raisedAtMs, tMs, 0, f.spike.count, f.spike.severity);
        m.spike = null;
      }
    }
  }

  function observeStale(station: string, sensor: string, tMs: number, out: AlertRecord[]): void {
    const f = rules.faults.stale;
    const key = [station, sensor].join(sep);
    const tr = (st.sensors[key] ??= { lastMs: -Infinity, intervals: [], stale: null, staleLimitMs: null });
    if (tMs <= tr.lastMs) return;
    if (tr.stale !== null) {
      const gapS = (tMs - tr.lastMs) / 1000;
      out.push(
        base(
          'stale',
          'fault',
          'cleared',
          station,
          tMs,
          `stale${sep}${key}`,
          tr.stale.raisedAtMs,
          gapS,
          (tr.staleLimitMs ?? 0) / 1000,
          f.severity,
          {
            fault: 'stale',
            sensor,
          },
        ),
      );
    }
    trackMessage(tr, tMs);
    tr.stale = null;
    tr.staleLimitMs = null;
  }

  return {
    rules,
    observe(metric, station, sensor, tMs, value, flag) {
      const out: AlertRecord[] = [];
      if (!Number.isFinite(tMs)) return out;
      const qc: QcInfo = typeof flag === 'number' ? { flag } : flag;
      // A sample failing the timing test (stamped ahead of its receipt: a clock fault) or dropped as a duplicate
      // says nothing trustworthy about when the sensor last spoke.
      if (
        qc.tests?.timing !== 4 &&
        sensor !== undefined &&
        rules.faults.stale.enabled &&
        inScope(rules.faults.stale, station, sensor)
      ) {
        observeStale(station, sensor, tMs, out);
      }
      if (typeof flag !== 'number') observeFaults(metric, station, sensor, tMs, value, qc, out);
      if (Number.isFinite(value) && qc.flag !== 4 && qc.flag !== 9) {
        observeThresholds(metric, station, sensor, tMs, value, qc.flag, out);
      }
      return out;
    },
    advance(watermarkMs) {
      const out: AlertRecord[] = [];
      if (st.watermarkMs !== null && watermarkMs <= st.watermarkMs) return out;
      // The silences are checked when the watermark enters a new STALE_STEP_MS step of event time, not on
      // every message: the check walks every sensor, and a raise is stamped at last message + limit anyway,
      // so only a silence that ends within one step of passing its limit (>= 5 min) can go unreported.
      const step = Math.floor(watermarkMs / STALE_STEP_MS);
      const due = st.watermarkMs === null || step !== Math.floor(st.watermarkMs / STALE_STEP_MS);
      st.watermarkMs = watermarkMs;
      const f = rules.faults.stale;
      if (!f.enabled || !due) return out;
      // Sorted keys: the order of the records does not depend on the order sensors were first seen.
      for (const key of Object.keys(st.sensors).sort()) {
        const tr = st.sensors[key] as SensorTrack;
        if (tr.stale !== null) continue;
        const lim = staleLimitMs(tr, f.factor, f.minMs);
        if (lim === null || !(watermarkMs - tr.lastMs > lim)) continue;
        const [station = '', sensor = ''] = key.split(sep);
        const atMs = tr.lastMs + lim; // event time at which the silence passed the limit, not the watermark's
        tr.stale = { raisedAtMs: atMs };
        tr.staleLimitMs = lim;
        out.push(
          base(
            'stale',
            'fault',
            'raised',
            station,
            atMs,
            `stale${sep}${key}`,
            atMs,
            lim / 1000,
            lim / 1000,
            f.severity,
            {
              fault: 'stale',
              sensor,
            },
          ),
        );
      }
      return out;
    },
    snapshot() {
      return structuredClone(st);
    },
    restore(snapshot) {
      if (snapshot?.v !== 1 || snapshot.site !== site) {
        throw new Error(
          `REEFD_ALERTS_BAD_SNAPSHOT: snapshot version ${String(snapshot?.v)} for site "${String(snapshot?.site)}" ` +
            `does not fit this engine (version 1, site "${site}"); delete the alert state file to start afresh`,
        );
      }
      st = structuredClone(snapshot);
      // JSON turns -Infinity into null: a sensor restored before its first message keeps "never seen".
      for (const tr of Object.values(st.sensors)) if (typeof tr.lastMs !== 'number') tr.lastMs = -Infinity;
    },
    active() {
      const out: AlertRecord[] = [];
      for (const [key, s] of Object.entries(st.thresholds)) {
        if (s.raisedAtMs === null || (s.phase !== 'raised' && s.phase !== 'pending_clear')) continue;
        const [rid, metric, station = '', sensor] = key.split(sep);
        const r = rules.thresholds.find((x) => x.id === rid && x.metric === metric);
        if (r === undefined) continue;
        out.push(
          base(r.id, r.class, 'raised', station, s.raisedAtMs, key, s.raisedAtMs, null, r.limit, r.severity, {
            metric,
            fault: r.fault,
            sensor: sensor || undefined,
          }),
        );
      }
      for (const [key, tr] of Object.entries(st.sensors)) {
        if (tr.stale === null) continue;
        const [station = '', sensor] = key.split(sep);
        const lim = (tr.staleLimitMs ?? 0) / 1000;
        out.push(
          base(
            'stale',
            'fault',
            'raised',
            station,
            tr.stale.raisedAtMs,
            `stale${sep}${key}`,
            tr.stale.raisedAtMs,
            lim,
            lim,
            rules.faults.stale.severity,
            { fault: 'stale', sensor },
          ),
        );
      }
      for (const [key, m] of Object.entries(st.metrics)) {
        const [metric, station = '', sensor] = key.split(sep);
        for (const fault of ['range', 'flatline', 'spike'] as const) {
          const a = m[fault];
          if (a === null) continue;
          out.push(
            base(
              fault,
              'fault',
              'raised',
              station,
              a.raisedAtMs,
              `${fault}${sep}${key}`,
              a.raisedAtMs,
              null,
              null,
              rules.faults[fault].severity,
              { metric, fault, sensor: sensor || undefined },
            ),
          );
        }
      }
      return out.sort((a, b) => (a.t < b.t ? -1 : a.t > b.t ? 1 : a.id < b.id ? -1 : 1));
    },
  };
}
