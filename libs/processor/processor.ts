// The processor: a deterministic state machine on event time, (state, message) -> (state, records).
// The same code runs live, in replay and in tests; only the order of messages matters, never the clock.
import type { DerivedRecord, ReefdConfig, SensorConfig, SensorMessage } from '../contract/index.js';
import {
  createAlertEngine,
  type AlertEngine,
  type AlertRecord,
  type EngineSnapshot,
} from '../alerts/index.js';
import { createQcState, qcUpdate, type QcResult, type QcState } from '../qc/index.js';
import {
  ctdAt,
  deriveCarbonate,
  deriveCurrent,
  deriveOxygen,
  deriveWaves,
  makeContext,
  type DeriveContext,
} from './derive.js';
import { fluxAt, transectParams } from './flux.js';
import { capCount, insert, pruneBefore, type Series } from './series.js';
import { createState, emptyStation, STATE_VERSION, type ProcessorState, type StationVar } from './state.js';
import type { TransectParams } from '../metabolism/index.js';

const MIN = 60_000;
const HOUR = 3_600_000;
/** A sample stamped more than this after its receive time comes from a wrong clock (QARTOD timing test). */
export const MAX_CLOCK_LEAD_MS = 60_000;
/** Bound on remembered samples per series, whatever the sensor's rate. */
const MAX_SERIES_SAMPLES = 4096;
const RECENT_IDS = 64;

/**
 * When a message is complete: its sample time, or for a pressure burst the time of its last sample (`t` is
 * the first). Lateness and the watermark use it, so a 17-min burst is not late for being long; holding and
 * release use `t`, so a burst is derived before the windows its samples fall in are computed.
 */
function completeMs(m: SensorMessage): number {
  return m.kind === 'pressure' ? m.tMs + Math.round(((m.p_dbar.length - 1) / m.fs_hz) * 1000) : m.tMs;
}

/** The alert engine's records are contract `alert` records (with `id` and `severity` of our own). */
const alertRecord = (a: AlertRecord): DerivedRecord => ({ ...a }) as DerivedRecord;

export type PushStatus = 'ok' | 'duplicate' | 'clock_fault' | 'disabled';

export interface PushResult {
  status: PushStatus;
  records: DerivedRecord[];
  /** The message arrived after the watermark had passed its time. */
  late: boolean;
}

export interface Processor {
  /** Feeds one validated message (see checkAgainstConfig) received at rxMs. */
  push(message: SensorMessage, rxMs: number): PushResult;
  /** Computes every window whose end the data has passed, ignoring the lateness (end of a replay). */
  drain(): DerivedRecord[];
  /** The whole state as plain JSON data (the checkpoint). */
  snapshot(): ProcessorState;
  /** Event-time watermark, ms (0 before the first message). */
  watermarkMs(): number;
  counters(): ProcessorState['counters'];
  /** Alerts raised and not yet cleared. */
  activeAlerts(): DerivedRecord[];
  /** Last seen, battery and last flag of every sensor that has reported. */
  sensorHealth(): SensorHealthRow[];
}

export interface SensorHealthRow {
  station: string;
  sensor: string;
  kind: string;
  lastSeenMs: number;
  batteryV: number | null;
  flag: number | null;
}

/**
 * Checks a schema-valid message against the configuration: a station, sensor and kind it knows. Returns the
 * reject reason, or undefined. Called before archiving so the archive marks such messages as rejected.
 */
export function checkAgainstConfig(config: ReefdConfig, m: SensorMessage): string | undefined {
  if (m.site !== config.site) return 'unknown_site';
  const st = config.stations[m.station];
  if (st === undefined) return 'unknown_station';
  const s = st.sensors[m.sensor];
  if (s === undefined) return 'unknown_sensor';
  if (s.kind !== m.kind) return 'kind_mismatch';
  return undefined;
}

export function createProcessor(config: ReefdConfig, restored?: ProcessorState): Processor {
  const stationIds = Object.keys(config.stations);
  const state: ProcessorState =
    restored !== undefined && restored.version === STATE_VERSION
      ? structuredClone(restored)
      : createState(stationIds);
  for (const id of stationIds) state.stations[id] ??= emptyStation();
  const ctx: DeriveContext = makeContext(config, state);
  const alerts: AlertEngine = createAlertEngine(config.alerts, config.site);
  if (state.alerts !== undefined && state.alerts !== null) {
    try {
      alerts.restore(state.alerts as EngineSnapshot);
    } catch {
      // A snapshot of another site or version: start the alert state fresh (episodes re-evaluate on data).
    }
  }
  const params = new Map<string, TransectParams>(
    Object.entries(config.transects).map(([id, tr]) => [id, transectParams(config, tr)]),
  );
  const W = config.processing.window_min * MIN;
  const cadence = config.processing.cadence_min * MIN;
  const lateness = config.processing.lateness_min * MIN;
  // A window waits this long past the watermark: a pressure burst stamped at its start whose centre falls in
  // the window completes (and arrives) up to a burst length after the window's end.
  const windowDelay = config.processing.window_delay_min * MIN;
  // Messages are held this long behind the newest event time and derived in event-time order.
  const reorderMs = Math.min(config.processing.reorder_min, config.processing.lateness_min) * MIN;
  // Samples are kept for two windows (storage), the lateness, and the CTD match distance, with a margin.
  const horizonMs = 2 * W + lateness + windowDelay + config.processing.ctd_match_min * MIN + HOUR;
  const siteHorizonMs = Math.max(horizonMs, config.processing.baro_max_gap_h * HOUR + HOUR);
  const sampleHorizonMs = config.processing.sample_max_age_h * HOUR + horizonMs;

  const count = (r: DerivedRecord) => {
    state.counters.records[r.type] = (state.counters.records[r.type] ?? 0) + 1;
  };

  function put(station: string, v: StationVar, tMs: number, value: number, flag: number): void {
    const s = state.stations[station]?.[v];
    if (s === undefined || !Number.isFinite(value)) return;
    insert(s, tMs, value, flag);
    capCount(s, MAX_SERIES_SAMPLES);
  }

  function putSite(s: Series, tMs: number, value: number | undefined, flag: number): void {
    if (value === undefined || !Number.isFinite(value)) return;
    insert(s, tMs, value, flag);
    capCount(s, MAX_SERIES_SAMPLES);
  }

  function qc(m: SensorMessage, variable: string, value: number, rxMs: number): QcResult {
    const key = `${m.station}/${m.sensor}/${variable}`;
    let q = state.qc[key] as QcState | undefined;
    if (q === undefined) {
      q = createQcState(variable);
      state.qc[key] = q;
    }
    return qcUpdate(q, m.tMs, value, rxMs);
  }

  /** QC of one raw or derived value, fed to the alert engine; returns its flag. */
  function check(
    m: SensorMessage,
    metric: string,
    variable: string | undefined,
    value: number,
    rxMs: number,
    out: DerivedRecord[],
    flagIn = 1,
  ): number {
    if (variable === undefined) {
      for (const a of alerts.observe(metric, m.station, m.sensor, m.tMs, value, flagIn))
        out.push(alertRecord(a));
      return flagIn;
    }
    const r = qc(m, variable, value, rxMs);
    const info = flagIn > r.flag ? { ...r, flag: flagIn } : r;
    for (const a of alerts.observe(metric, m.station, m.sensor, m.tMs, value, info)) out.push(alertRecord(a));
    return info.flag;
  }

  function observeRecord(
    r: DerivedRecord,
    sensor: string | undefined,
    tMs: number,
    flag: number,
    out: DerivedRecord[],
  ): void {
    const station = r.type === 'flux' || r.type === 'daily' ? r.transect : String(r.station ?? '');
    for (const [k, v] of Object.entries(r)) {
      if (typeof v !== 'number' || k === 'flag') continue;
      for (const a of alerts.observe(`${r.type}.${k}`, station, sensor, tMs, v, flag))
        out.push(alertRecord(a));
    }
  }

  function isDuplicate(m: SensorMessage): boolean {
    const key = `${m.station}/${m.sensor}`;
    let s = state.sensors[key];
    if (s === undefined) {
      s = { lastTMs: 0, recentT: [], recentSeq: [], count: 0 };
      state.sensors[key] = s;
    }
    if (s.recentT.includes(m.tMs) || (m.seq !== undefined && s.recentSeq.includes(m.seq))) return true;
    s.recentT.push(m.tMs);
    if (s.recentT.length > RECENT_IDS) s.recentT.shift();
    if (m.seq !== undefined) {
      s.recentSeq.push(m.seq);
      if (s.recentSeq.length > RECENT_IDS) s.recentSeq.shift();
    }
    if (m.tMs > s.lastTMs) s.lastTMs = m.tMs;
    s.count++;
    return false;
  }

  function sensorConfig(m: SensorMessage): SensorConfig | undefined {
    return config.stations[m.station]?.sensors[m.sensor];
  }

  function derive(m: SensorMessage, rxMs: number, out: DerivedRecord[]): void {
    const sc = sensorConfig(m);
    if (m.battery_v !== undefined) check(m, `${m.kind}.battery_v`, 'battery_v', m.battery_v, rxMs, out);
    switch (m.kind) {
      case 'ctd': {
        const ft = check(m, 'ctd.temp_c', 'temp_c', m.temp_c, rxMs, out);
        const fs = check(m, 'ctd.sal', 'sal', m.sal, rxMs, out);
        put(m.station, 'temp', m.tMs, m.temp_c, ft);
        put(m.station, 'sal', m.tMs, m.sal, fs);
        return;
      }
      case 'oxygen': {
        const r = deriveOxygen(ctx, m, sc?.kind === 'oxygen' ? sc.sal_setting : undefined);
        if ('skip' in r) {
          check(m, 'oxygen.missing', undefined, Number.NaN, rxMs, out, 9);
          return;
        }
        const f = check(m, 'oxygen.o2_umol_kg', 'o2_umol_kg', r.o2UmolKg, rxMs, out, r.flag);
        r.record.flag = f;
        out.push(r.record);
        observeRecord(r.record, m.sensor, m.tMs, f, out);
        put(m.station, 'o2', m.tMs, r.o2UmolKg, f);
        return;
      }
      case 'pco2': {
        const key = `${m.station}/${m.sensor}`;
        const f0 = check(m, 'pco2.pco2_uatm', 'pco2_uatm', m.pco2_uatm, rxMs, out);
        if (f0 === 4) return; // a failed reading never feeds a derivation (docs/methods/qc.md 7.4)
        const r = deriveCarbonate(ctx, m, state.sensors[key]?.lastPh);
        if ('skip' in r) return;
        const f = Math.max(f0, r.flag);
        r.record.flag = f;
        const s = state.sensors[key];
        if (s) s.lastPh = r.ph;
        out.push(r.record);
        observeRecord(r.record, m.sensor, m.tMs, f, out);
        put(m.station, 'pco2', m.tMs, r.pco2Out, f);
        put(m.station, 'ta', m.tMs, r.ta, f);
        put(m.station, 'dic', m.tMs, r.dic, f);
        return;
      }
      case 'pressure': {
        if (sc?.kind !== 'pressure') return;
        const r = deriveWaves(ctx, m, sc.height_m);
        const tC = Date.parse(r.record.t);
        let f = r.flag;
        if (r.depthM !== null) {
          f = Math.max(f, check(m, 'waves.depth_m', 'depth_m', r.depthM, rxMs, out));
          put(m.station, 'depth', tC, r.depthM, f);
        }
        if (r.hm0SsM !== null) put(m.station, 'hm0ss', tC, r.hm0SsM, f);
        // Stamped at completion too: an ensemble may use a burst only once the burst is complete.
        const done = completeMs(m);
        if (r.depthM !== null) put(m.station, 'depthDone', done, r.depthM, f);
        if (r.hm0SsM !== null) put(m.station, 'hm0ssDone', done, r.hm0SsM, f);
        r.record.flag = f;
        out.push(r.record);
        // Every observation of one message carries the message time, so the stale tracker learns the sensor's real interval.
        observeRecord(r.record, m.sensor, m.tMs, f, out);
        return;
      }
      case 'adcp': {
        if (sc?.kind !== 'adcp') return;
        const r = deriveCurrent(ctx, m, sc);
        out.push(r.record);
        const tilt = r.record.reason === 'tilt' ? 4 : 1;
        check(
          m,
          'current.speed_m_s',
          undefined,
          (r.record.speed_m_s as number | null) ?? Number.NaN,
          rxMs,
          out,
          Math.max(r.flag, tilt),
        );
        if (r.eastMS !== null && r.northMS !== null) {
          put(m.station, 'east', m.tMs, r.eastMS, r.flag);
          put(m.station, 'north', m.tMs, r.northMS, r.flag);
        }
        return;
      }
      case 'par': {
        const f = check(m, 'par.par_umol_m2_s', 'par_umol_m2_s', m.par_umol_m2_s, rxMs, out);
        putSite(state.site.par, m.tMs, m.par_umol_m2_s, f);
        return;
      }
      case 'met': {
        const fw = check(m, 'met.wind_m_s', 'wind_m_s', m.wind_m_s, rxMs, out);
        const fb = check(m, 'met.baro_hpa', 'baro_hpa', m.baro_hpa, rxMs, out);
        putSite(state.site.wind, m.tMs, m.wind_m_s, fw);
        putSite(state.site.baro, m.tMs, m.baro_hpa, fb);
        putSite(state.site.xco2, m.tMs, m.xco2_air_ppm, 1);
        return;
      }
      case 'sample': {
        check(m, 'sample.received', undefined, 1, rxMs, out);
        if (m.ta_umol_kg !== undefined) put(m.station, 'sampleTa', m.tMs, m.ta_umol_kg, 1);
        if (m.dic_umol_kg !== undefined) put(m.station, 'sampleDic', m.tMs, m.dic_umol_kg, 1);
        // A bottle without its own salinity takes the station CTD's at its time (docs/methods/carbonate.md 3.6).
        const sal = m.sal ?? ctdAt(ctx, m.station, m.tMs)?.sal.value;
        if (sal !== undefined) put(m.station, 'sampleSal', m.tMs, sal, 1);
        return;
      }
    }
  }

  /** Flux windows whose end the watermark has passed, then pruning and stale detection. */
  function advance(watermark: number, out: DerivedRecord[]): void {
    if (state.lastTickMs < 0) {
      // The cadence grid starts at the earliest message derived (not the first to arrive), so the windows
      // do not depend on the delivery order within the lateness.
      if (state.firstDerivedMs === undefined) return;
      state.lastTickMs = Math.floor(state.firstDerivedMs / cadence) * cadence;
    }
    let next = state.lastTickMs + cadence;
    // After a long silence, resume on the grid instead of walking every empty tick.
    if (watermark - next > 2 * 24 * HOUR) next = Math.floor((watermark - 2 * W) / cadence) * cadence;
    for (; next + windowDelay <= watermark; next += cadence) {
      if (Object.keys(config.transects).length > 0) {
        for (const r of fluxAt(config, state, next, params)) {
          out.push(r);
          observeRecord(r, undefined, Date.parse(r.t), (r.flag as number | undefined) ?? 1, out);
        }
      }
      state.lastTickMs = next;
    }
    // Pruning walks every series of every station, so it runs when the watermark enters a new minute, not
    // on every message: the horizons are hours longer than anything a derivation reads, so when the old
    // samples go changes no record.
    const pruneStep = Math.floor(watermark / MIN);
    if (pruneStep !== lastPruneStep) {
      lastPruneStep = pruneStep;
      prune(watermark);
    }
    for (const a of alerts.advance(watermark)) out.push(alertRecord(a));
  }

  let lastPruneStep = -1;
  function prune(watermark: number): void {
    const cut = watermark - horizonMs;
    const sampleCut = watermark - sampleHorizonMs;
    for (const id in state.stations) {
      const st = state.stations[id] as Record<StationVar, Series>;
      for (const k in st) {
        const s = st[k as StationVar];
        const c = k.startsWith('sample') ? sampleCut : cut;
        if (s.t.length > 0 && (s.t[0] as number) < c) pruneBefore(s, c);
      }
    }
    const siteCut = watermark - siteHorizonMs;
    for (const k in state.site) {
      const s = state.site[k as keyof typeof state.site] as Series;
      if (s.t.length > 0 && (s.t[0] as number) < siteCut) pruneBefore(s, siteCut);
    }
  }

  /** Derives one message and notes its sensor's health (battery, worst flag of what it produced). */
  function deriveOne(m: SensorMessage, rxMs: number, out: DerivedRecord[]): void {
    const from = out.length;
    if (state.firstDerivedMs === undefined || m.tMs < state.firstDerivedMs) state.firstDerivedMs = m.tMs;
    ctx.asOfMs = m.tMs;
    derive(m, rxMs, out);
    const ss = state.sensors[`${m.station}/${m.sensor}`];
    if (ss) {
      if (m.battery_v !== undefined) ss.batteryV = m.battery_v;
      let worstFlag = 1;
      for (let i = from; i < out.length; i++) {
        const r = out[i] as DerivedRecord;
        const f = (r as { flag?: unknown }).flag;
        if (r.type !== 'alert' && typeof f === 'number' && f > worstFlag) worstFlag = f;
      }
      ss.lastFlag = worstFlag;
    }
  }

  // Among messages of the same time, the ones others are paired with go first (CTD, barometer, depth),
  // then by station and sensor: the release order is a function of the messages alone.
  const KIND_ORDER: Record<string, number> = {
    ctd: 0,
    met: 1,
    pressure: 2,
    sample: 3,
    adcp: 4,
    par: 5,
    oxygen: 6,
    pco2: 7,
  };
  const before = (a: { message: SensorMessage }, b: { message: SensorMessage }): boolean => {
    const x = a.message;
    const y = b.message;
    if (x.tMs !== y.tMs) return x.tMs < y.tMs;
    const kx = KIND_ORDER[x.kind] ?? 9;
    const ky = KIND_ORDER[y.kind] ?? 9;
    if (kx !== ky) return kx < ky;
    if (x.station !== y.station) return x.station < y.station;
    return x.sensor < y.sensor;
  };

  function holdInOrder(m: SensorMessage, rxMs: number): void {
    const held = state.held;
    const item = { message: m, rxMs };
    let i = held.length;
    while (i > 0 && before(item, held[i - 1] as (typeof held)[number])) i--;
    held.splice(i, 0, item);
  }

  /** Derives the held messages the watermark has passed, in event-time order. */
  function release(watermarkMs: number, out: DerivedRecord[]): void {
    const held = state.held;
    let n = 0;
    while (n < held.length && (held[n] as (typeof held)[number]).message.tMs <= watermarkMs) n++;
    if (n === 0) return;
    for (const h of held.splice(0, n)) deriveOne(h.message, h.rxMs, out);
  }

  const watermark = () => (state.maxEventMs > 0 ? state.maxEventMs - lateness : 0);

  return {
    push(m, rxMs) {
      const out: DerivedRecord[] = [];
      if (sensorConfig(m)?.enabled === false) {
        state.counters.disabledSensor++;
        return { status: 'disabled', records: out, late: false };
      }
      if (m.tMs - rxMs > MAX_CLOCK_LEAD_MS) {
        // A sensor clock running ahead would drag the watermark into the future and close every window.
        state.counters.clockFaults++;
        check(m, `${m.kind}.clock`, undefined, Number.NaN, rxMs, out, 4);
        return { status: 'clock_fault', records: out, late: false };
      }
      if (isDuplicate(m)) {
        state.counters.duplicates++;
        return { status: 'duplicate', records: out, late: false };
      }
      state.counters.accepted++;
      const eMs = completeMs(m);
      const late = eMs < watermark();
      if (eMs > state.maxEventMs) state.maxEventMs = eMs;
      if (late) {
        // Past the watermark: its windows are closed; derived now, counted late (QC judges its order).
        state.counters.late++;
        deriveOne(m, rxMs, out);
      } else {
        // Held in event-time order for reorder_min, then derived (reorder_min 0: at once); with
        // reorder_min = lateness_min the records do not depend on the delivery order at all.
        holdInOrder(m, rxMs);
      }
      release(state.maxEventMs - reorderMs, out);
      advance(watermark(), out);
      for (const r of out) count(r);
      return { status: 'ok', records: out, late };
    },
    drain() {
      const out: DerivedRecord[] = [];
      release(Infinity, out);
      if (state.maxEventMs > 0) advance(state.maxEventMs, out);
      for (const r of out) count(r);
      return out;
    },
    snapshot() {
      state.alerts = alerts.snapshot();
      return structuredClone(state);
    },
    watermarkMs: watermark,
    counters: () => structuredClone(state.counters),
    activeAlerts: () => alerts.active().map(alertRecord),
    sensorHealth: () =>
      Object.entries(state.sensors).map(([key, s]) => {
        const [station = '', sensor = ''] = key.split('/');
        return {
          station,
          sensor,
          kind: config.stations[station]?.sensors[sensor]?.kind ?? 'unknown',
          lastSeenMs: s.lastTMs,
          batteryV: s.batteryV ?? null,
          flag: s.lastFlag ?? null,
        };
      }),
  };
}
