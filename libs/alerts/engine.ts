// The alert engine: a deterministic state machine on event time (docs/methods/conventions.md 1.5;
// docs/methods/alerts.md 8; docs/contract-v1.md section 4). observe() feeds one metric value with its QC,
// advance() moves the watermark for stale detection; both return the alert records of the transitions they
// cause. All state is plain JSON (snapshot/restore), so a restart resumes mid-episode with no second raise
// and no lost clear.

import { DEFAULT_QC_LIMITS } from '../qc/index.js';
import { newBatteryWarnSeries, stepBatteryWarning, type BatteryWarnSeries } from './battery-warning.js';
import { alertsConfigSchema, type AlertsConfigInput } from '../contract/index.js';
import { newMetricFaults, type MetricFaults, type SensorTrack } from './faults.js';
import { activeAlerts } from './active.js';
import { makeAlert, SEP as sep, type AlertMaker } from './record.js';
import { inScope, resolveRules, type ResolvedRules } from './rules.js';
import { kindOfMetric, rebuildStale, staleDue, staleExempt, staleMessage } from './stale.js';
import { newThresholdSeries, stepThreshold, type ThresholdSeries } from './threshold.js';
import type { AlertRecord, FaultName, QcInfo, ThresholdRule } from './types.js';
import { ALERTS_ERRORS } from './errors.js';

export interface EngineSnapshot {
  v: 1;
  site: string;
  watermarkMs: number | null;
  thresholds: Record<string, ThresholdSeries>;
  metrics: Record<string, MetricFaults>;
  sensors: Record<string, SensorTrack>;
  /** Battery trend warnings per station and sensor (absent in snapshots of earlier versions). */
  battery?: Record<string, BatteryWarnSeries>;
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
  /**
   * Deep copy of the state as plain JSON-serialisable data; with `copy: false` the state itself, for a caller
   * that serialises it before the engine is next called and keeps nothing of it.
   */
  snapshot(options?: { copy?: boolean }): EngineSnapshot;
  /** Replaces the state with a snapshot (throws REEFD_ALERTS_BAD_SNAPSHOT on a wrong version or site). */
  restore(snapshot: EngineSnapshot): void;
  /** Episodes raised and not yet cleared, as their raise records. */
  active(): AlertRecord[];
}

/** Creates an engine for one site. `config` is the `alerts:` section (raw or already parsed; parsed again). */
export function createAlertEngine(config: AlertsConfigInput | undefined, site: string): AlertEngine {
  const parsed = alertsConfigSchema.safeParse(config ?? {});
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw ALERTS_ERRORS.error(
      'REEFD_ALERTS_BAD_CONFIG',
      `alerts.${first?.path.join('.') ?? ''}: ${first?.message ?? 'invalid'} (see libs/alerts/README.md)`,
      { detail: { path: ['alerts', ...(first?.path ?? [])].join('.') } },
    );
  }
  const rules = resolveRules(parsed.data);
  let st: EngineSnapshot = {
    v: 1,
    site,
    watermarkMs: null,
    thresholds: {},
    metrics: {},
    sensors: {},
    battery: {},
  };
  const staleCfg = rules.faults.stale;
  let schedule = rebuildStale(st.sensors, staleCfg);

  const base: AlertMaker = (...args) => makeAlert(site, ...args);

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
      // A reading stuck at zero or at a rail of its range (libs/qc stuck test) is a range fault too; its limit
      // is the value it is stuck at.
      const stuck = tests.stuck === 4;
      if (tests.gross_range === 4 || stuck) {
        m.rangeOkSinceMs = null;
        if (m.range === null) {
          const lim = qc.limits ?? DEFAULT_QC_LIMITS[metric.slice(metric.indexOf('.') + 1)]?.sensor;
          const limit = stuck
            ? value
            : lim === undefined
              ? null
              : lim.min !== undefined && value < lim.min
                ? lim.min
                : (lim.max ?? null);
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
    const ended = staleMessage(schedule, tr, key, tMs, staleCfg);
    if (ended === null) return;
    out.push(
      base(
        'stale',
        'fault',
        'cleared',
        station,
        tMs,
        `stale${sep}${key}`,
        ended.raisedAtMs,
        ended.gapMs / 1000,
        ended.limitMs / 1000,
        f.severity,
        { fault: 'stale', sensor },
      ),
    );
  }

  function observeBattery(
    metric: string,
    station: string,
    sensor: string | undefined,
    tMs: number,
    volts: number,
    out: AlertRecord[],
  ): void {
    const b = rules.batteryTrend;
    const cutoff = b.cutoffV[kindOfMetric(metric)];
    if (!b.enabled || cutoff === undefined || !inScope(b, station, sensor)) return;
    const key = ['battery_trend', station, sensor ?? ''].join(sep);
    const s = ((st.battery ??= {})[key] ??= newBatteryWarnSeries());
    const raisedBefore = s.raisedAtMs;
    const step = stepBatteryWarning(s, b, cutoff, tMs, volts);
    if (step.transition === null) return;
    const hours =
      step.hours === null || !Number.isFinite(step.hours) ? null : Math.round(step.hours * 10) / 10;
    const raisedAt = step.transition === 'raised' ? tMs : (raisedBefore ?? tMs);
    out.push(
      base(
        'battery_trend',
        'fault',
        step.transition,
        station,
        tMs,
        key,
        raisedAt,
        hours,
        b.warnHours,
        b.severity,
        {
          metric,
          fault: 'battery',
          sensor,
        },
      ),
    );
  }

  return {
    rules,
    observe(metric, station, sensor, tMs, value, flag) {
      const out: AlertRecord[] = [];
      if (!Number.isFinite(tMs)) return out;
      const qc: QcInfo = typeof flag === 'number' ? { flag } : flag;
      // A sample failing the timing test (stamped ahead of its receipt: a clock fault) or dropped as a duplicate
      // says nothing trustworthy about when the sensor last spoke.
      // Irregular kinds (bottle samples) are never stale (docs/methods/faults.md 12.5).
      if (
        qc.tests?.timing !== 4 &&
        sensor !== undefined &&
        rules.faults.stale.enabled &&
        inScope(rules.faults.stale, station, sensor) &&
        !staleExempt(metric)
      ) {
        observeStale(station, sensor, tMs, out);
      }
      if (typeof flag !== 'number') observeFaults(metric, station, sensor, tMs, value, qc, out);
      if (metric.endsWith('.battery_v') && qc.flag !== 4 && qc.flag !== 9) {
        observeBattery(metric, station, sensor, tMs, value, out);
      }
      if (Number.isFinite(value) && qc.flag !== 4 && qc.flag !== 9) {
        observeThresholds(metric, station, sensor, tMs, value, qc.flag, out);
      }
      return out;
    },
    advance(watermarkMs) {
      const out: AlertRecord[] = [];
      if (st.watermarkMs !== null && watermarkMs <= st.watermarkMs) return out;
      st.watermarkMs = watermarkMs;
      const f = rules.faults.stale;
      if (!f.enabled) return out;
      // Only the sensors whose deadline the watermark passed come out of the heap (issue 17), earliest first.
      for (const due of staleDue(schedule, st.sensors, watermarkMs, staleCfg)) {
        const [station = '', sensor = ''] = due.key.split(sep);
        const limS = due.limitMs / 1000;
        out.push(
          base(
            'stale',
            'fault',
            'raised',
            station,
            due.atMs,
            `stale${sep}${due.key}`,
            due.atMs,
            limS,
            limS,
            f.severity,
            { fault: 'stale', sensor },
          ),
        );
      }
      return out;
    },
    snapshot(o) {
      return o?.copy === false ? st : structuredClone(st);
    },
    restore(snapshot) {
      if (snapshot?.v !== 1 || snapshot.site !== site) {
        throw ALERTS_ERRORS.error(
          'REEFD_ALERTS_BAD_SNAPSHOT',
          `snapshot version ${String(snapshot?.v)} for site "${String(snapshot?.site)}" ` +
            `does not fit this engine (version 1, site "${site}")`,
        );
      }
      st = structuredClone(snapshot);
      st.battery ??= {};
      // JSON turns -Infinity into null: a sensor restored before its first message keeps "never seen".
      for (const tr of Object.values(st.sensors)) if (typeof tr.lastMs !== 'number') tr.lastMs = -Infinity;
      schedule = rebuildStale(st.sensors, staleCfg);
    },
    active() {
      return activeAlerts(st, rules, base);
    },
  };
}
