// Fault propagation in the processor (docs/methods/faults.md 12.7; docs/contract-v1.md, E3 validity): the
// sensor-fault state of libs/qc fed with every message, QC result, supply voltage and watermark, the samples each
// sensor failed, and which sensors a record or a flux window was built from. A record built from a sensor with an
// invalidating fault in force at its time is flagged 4 and says why (`invalid_reasons`); a flux window is
// invalid while any of its input sensors has such a fault or failed a sample in the window.
// Everything lives in the processor state (plain JSON: the checkpoint).
import type { LogbookEntry, ReefdConfig, SensorMessage, TransectConfig } from '../contract/index.js';
import type { ResolvedRules } from '../alerts/index.js';
import {
  activeFaults,
  createFaultState,
  DEFAULT_FAULT_OPTIONS,
  faultsAdvance,
  faultsExternal,
  faultsOnBattery,
  faultsOnMessage,
  faultsOnQc,
  faultsRestore,
  INVALIDATING_FAULTS,
  invalidReasons,
  type FaultOptions,
  type FaultState,
  type QcOutcome,
} from '../qc/index.js';
import type { InputRef } from './derive.js';
import { kindModules } from './kinds/index.js';
import type { ProcessorState, SensorState } from './state.js';

const HOUR = 3_600_000;
/** Failed-sample times kept per sensor: long enough for every window that may still close over them. */
const FAILED_KEEP_MS = 12 * HOUR;
const FAILED_MAX = 256;

/**
 * A span of a station's (or one sensor's) data that the field logbook excludes (docs/contract-v1.md, E2
 * `logbook_file`): every sensor it names is faulty (`logbook_exclusion`) over [fromMs, toMs).
 */
export interface FaultExclusion {
  station: string;
  /** One sensor of the station; absent for the whole station. */
  sensor?: string;
  fromMs: number;
  /** null: open until a later exclusion of the same start gives its end. */
  toMs: number | null;
  note?: string;
}

export interface FaultWiring {
  readonly options: FaultOptions;
  /** An accepted message, in event-time order, before its QC. */
  onMessage(m: SensorMessage): void;
  /**
   * One QC result of a sensor's variable. Returns the time of the previous sample of that variable when this
   * result finalised it as failed (the spike test's verdict comes one sample late), so its stored values can be
   * marked 4; else undefined.
   */
  onQc(
    src: { station: string; sensor: string; kind: string; tMs: number },
    variable: string,
    r: QcOutcome,
  ): number | undefined;
  /** A supply voltage (warns; never invalidates data). */
  onBattery(m: SensorMessage, volts: number): void;
  /** The watermark moved (stale detection and pruning). */
  advance(watermarkMs: number): void;
  /** Applies a logbook exclusion (idempotent: the same span again changes nothing). */
  exclude(x: FaultExclusion): void;
  /** The sensor keys (`station/sensor`) that write the series `ref`. */
  writers(ref: InputRef): readonly string[];
  /** `input_fault:<station>/<sensor>/<fault>` of the sensors with an invalidating fault in force at tMs. */
  faultsAt(keys: Iterable<string>, tMs: number): string[];
  /**
   * The reasons a window over [fromMs, toMs) built from `keys` is invalid: every invalidating fault overlapping
   * it, and `input_qc_failed:<station>/<sensor>` for each sensor that failed a sample in it. Sorted.
   */
  reasonsDuring(keys: Iterable<string>, fromMs: number, toMs: number): string[];
}

/** The options of the fault state from the alert rules (stale limit and spike count as the alerts have them). */
export function faultOptions(rules: ResolvedRules): FaultOptions {
  return {
    ...DEFAULT_FAULT_OPTIONS,
    staleFactor: rules.faults.stale.factor,
    staleMinMs: rules.faults.stale.minMs,
    spikeCount: rules.faults.spike.count,
    spikeWindowMs: rules.faults.spike.windowMs,
  };
}

/** Station series -> the keys of the sensors of that station whose kind writes it; site series likewise. */
function writerTables(config: ReefdConfig) {
  const station = new Map<string, string[]>();
  const site = new Map<string, string[]>();
  for (const [sid, st] of Object.entries(config.stations)) {
    for (const [sensor, sc] of Object.entries(st.sensors)) {
      const key = `${sid}/${sensor}`;
      const w = kindModules[sc.kind].writes;
      for (const v of w.station)
        (station.get(`${sid}/${v}`) ?? station.set(`${sid}/${v}`, []).get(`${sid}/${v}`))!.push(key);
      for (const v of w.site) (site.get(v) ?? site.set(v, []).get(v))!.push(key);
    }
  }
  return { station, site };
}

/** Notes a failed sample of a sensor (bounded in time and count). */
function noteFailed(s: SensorState, tMs: number): void {
  const f = (s.failedMs ??= []);
  if (f.includes(tMs)) return;
  f.push(tMs);
  f.sort((a, b) => a - b);
  const newest = f[f.length - 1] as number;
  while (f.length > FAILED_MAX || (f.length > 0 && (f[0] as number) < newest - FAILED_KEEP_MS)) f.shift();
}

export function createFaultWiring(
  config: ReefdConfig,
  state: ProcessorState,
  rules: ResolvedRules,
): FaultWiring {
  const options = faultOptions(rules);
  const st = (): FaultState => state.faults;
  const tables = writerTables(config);
  const cutoffV = rules.batteryTrend.cutoffV;
  const none: readonly string[] = [];
  faultsRestore(state.faults, options);

  const sensorState = (key: string): SensorState | undefined => state.sensors[key];

  return {
    options,
    onMessage(m) {
      faultsOnMessage(st(), options, `${m.station}/${m.sensor}`, m.kind, m.tMs);
    },
    onQc(src, variable, r) {
      const key = `${src.station}/${src.sensor}`;
      faultsOnQc(st(), options, key, src.kind, variable, src.tMs, r);
      const s = sensorState(key);
      if (s !== undefined && r.dropped === undefined && r.flag === 4) noteFailed(s, src.tMs);
      const fin = r.finalizedPrevious;
      if (fin === undefined || fin.flag !== 4) return undefined;
      if (s !== undefined) noteFailed(s, fin.tMs);
      return fin.tMs;
    },
    onBattery(m, volts) {
      const cut = cutoffV[m.kind];
      if (cut === undefined) return;
      faultsOnBattery(st(), options, `${m.station}/${m.sensor}`, m.kind, m.tMs, volts, cut);
    },
    advance(watermarkMs) {
      faultsAdvance(st(), options, watermarkMs);
    },
    exclude(x) {
      const sensors =
        x.sensor !== undefined ? [x.sensor] : Object.keys(config.stations[x.station]?.sensors ?? {});
      for (const sensor of sensors) {
        const kind = config.stations[x.station]?.sensors[sensor]?.kind;
        if (kind === undefined) continue;
        faultsExternal(st(), `${x.station}/${sensor}`, kind, 'logbook_exclusion', x.fromMs, x.toMs, x.note);
      }
    },
    writers(ref) {
      return (
        (ref.station === null ? tables.site.get(ref.v) : tables.station.get(`${ref.station}/${ref.v}`)) ??
        none
      );
    },
    faultsAt(keys, tMs) {
      const out = new Set<string>();
      for (const key of keys) {
        for (const ep of activeFaults(st(), key, tMs)) {
          if (INVALIDATING_FAULTS.includes(ep.fault)) out.add(`input_fault:${key}/${ep.fault}`);
        }
      }
      return [...out].sort();
    },
    reasonsDuring(keys, fromMs, toMs) {
      const list = [...new Set(keys)];
      // The library's span is closed [from, to]; a window is [from, to).
      const out = new Set(invalidReasons(st(), list, fromMs, toMs - 1));
      for (const key of list) {
        const f = sensorState(key)?.failedMs;
        if (f !== undefined && f.some((t) => t >= fromMs && t < toMs)) out.add(`input_qc_failed:${key}`);
      }
      return [...out].sort();
    },
  };
}

/**
 * The exclusions of field-logbook entries (docs/contract-v1.md 3.4): every entry with `exclude_from` and
 * `exclude_to` excludes its station, or its one sensor, over [exclude_from, exclude_to). The note is the event
 * and its text, for the fault's episode.
 */
export function exclusionsOf(entries: readonly LogbookEntry[]): FaultExclusion[] {
  const out: FaultExclusion[] = [];
  for (const e of entries) {
    if (e.exclude_from === undefined || e.exclude_to === undefined) continue;
    const x: FaultExclusion = {
      station: e.station,
      fromMs: Date.parse(e.exclude_from),
      toMs: Date.parse(e.exclude_to),
      note: e.text === undefined ? e.event : `${e.event}: ${e.text}`,
    };
    if (e.sensor !== undefined) x.sensor = e.sensor;
    out.push(x);
  }
  return out;
}

/** The sensors a transect window reads (docs/methods/metabolism.md 6.1): both stations, the current, the mast. */
export function windowInputs(wiring: FaultWiring, tr: TransectConfig): string[] {
  const keys = new Set<string>();
  const add = (ref: InputRef) => {
    for (const k of wiring.writers(ref)) keys.add(k);
  };
  for (const station of [tr.upstream, tr.downstream]) {
    for (const v of ['temp', 'sal', 'o2', 'depth', 'pco2', 'sampleTa', 'sampleDic'] as const)
      add({ station, v });
  }
  add({ station: tr.current, v: 'east' });
  add({ station: tr.current, v: 'north' });
  for (const v of ['wind', 'baro', 'xco2'] as const) add({ station: null, v });
  return [...keys].sort();
}

export { createFaultState };
