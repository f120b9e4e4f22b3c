// What the deployment's own files bring to the processor (docs/methods/calibration.md 13.2, 13.6): the
// calibration file's corrections and the field logbook's exclusions. The services read and check the files
// (libs do no I/O) and pass them in as ProcessorOptions; this module compiles the corrections once and answers,
// per record and per flux window, whether a correction entered it. The exclusions become sensor faults
// (faults.ts exclusionsOf, `logbook_exclusion`). Pure.
import { compileCalibration, type CalibrationTable, type CompiledCorrection } from '../calibration/index.js';
import type { Kind, ReefdConfig, TransectConfig } from '../contract/index.js';
import type { LogbookEntry } from '../logbook/index.js';
import type { FaultExclusion } from './faults.js';
import type { KindTable } from './kinds/index.js';
import type { SiteVar, StationVar } from './state.js';

export interface ProcessorOptions {
  /** The calibration file, compiled (libs/calibration compileCalibration of parseCalibrationText). */
  readonly calibration?: CalibrationTable;
  /**
   * The field logbook's entries (libs/logbook parseLogbookText): their exclusions make the sensors they name
   * faulty (`logbook_exclusion`) over each span (faults.ts), so their data are flagged 4 and no flux window over
   * them is valid. Given at every start (live, replay and restart alike); applying one again changes nothing.
   */
  readonly logbook?: readonly LogbookEntry[];
  /** More such spans, as faults.ts takes them (exclusionsOf of logbook entries). */
  readonly exclusions?: readonly FaultExclusion[];
  /**
   * How old a lab result may be and still be re-derived live when it arrives after its windows closed, ms
   * (revise.ts; default 24 h). Older ones are used from then on only; `reefd replay` places them all.
   */
  readonly reviseMaxAgeMs?: number;
}

/** The kinds whose messages feed a transect's windows, by the station's role (flux.ts transectWindow). */
const FLUX_INPUT_KINDS = {
  station: ['ctd', 'oxygen', 'pco2', 'pressure', 'sample'],
  current: ['adcp'],
  site: ['met'],
} as const satisfies Record<string, readonly Kind[]>;

export interface FieldHooks {
  readonly calibration: CalibrationTable;
  /**
   * True when a record of `kind` at `station` and tMs reads a series fed by a sensor with a correction in
   * force then (the station's CTD for a carbonate record, the mast's barometer, ...).
   */
  inputsCalibratedAt(station: string, kind: Kind, tMs: number): boolean;
  /** True when an input sensor of the transect has a correction in force during [fromMs, toMs). */
  transectCalibrated(transect: string, fromMs: number, toMs: number): boolean;
}

/** No calibration file: nothing is corrected (a derive context built outside a processor, in tests). */
export const NO_FIELD_HOOKS: FieldHooks = Object.freeze({
  calibration: compileCalibration([]),
  inputsCalibratedAt: () => false,
  transectCalibrated: () => false,
});

type Ref = { station: string; sensor: string; key: string };

/** Which kinds write each station and site series (from the kind table's `writes`). */
function writers(kinds: KindTable): { station: Map<StationVar, Kind[]>; site: Map<SiteVar, Kind[]> } {
  const station = new Map<StationVar, Kind[]>();
  const site = new Map<SiteVar, Kind[]>();
  for (const m of Object.values(kinds)) {
    for (const v of m.writes.station) station.set(v, [...(station.get(v) ?? []), m.kind]);
    for (const v of m.writes.site) site.set(v, [...(site.get(v) ?? []), m.kind]);
  }
  return { station, site };
}

function inForce(list: readonly CompiledCorrection[] | undefined, fromMs: number, toMs: number): boolean {
  if (list === undefined) return false;
  for (const c of list) if (c.fromMs < toMs && fromMs < c.toMs) return true;
  return false;
}

/**
 * The hooks of one configuration. `kinds` is the kind table (kinds/index.ts), passed in rather than imported
 * because the kind modules import the derive context that holds these hooks.
 */
export function createFieldHooks(
  config: ReefdConfig,
  options: ProcessorOptions,
  kinds: KindTable,
): FieldHooks {
  const calibration = options.calibration ?? compileCalibration([]);
  const sensorsOf = (station: string, kinds: readonly Kind[]): Ref[] =>
    Object.entries(config.stations[station]?.sensors ?? {})
      .filter(([, sc]) => kinds.includes(sc.kind))
      .map(([sensor]) => ({ station, sensor, key: `${station}/${sensor}` }));
  const siteSensors = (kinds: readonly Kind[]): Ref[] =>
    Object.keys(config.stations).flatMap((st) => sensorsOf(st, kinds));
  const w = writers(kinds);

  // The input sensors of a record kind at a station: writers of the station series its module reads there,
  // and of the site series anywhere. Built on first use (stations x kinds, a few dozen lists).
  const recordInputs = new Map<string, Ref[]>();
  const inputsOf = (station: string, kind: Kind): Ref[] => {
    const id = `${station}|${kind}`;
    let refs = recordInputs.get(id);
    if (refs === undefined) {
      const reads = kinds[kind].reads;
      const stationKinds = [...new Set(reads.station.flatMap((v) => w.station.get(v) ?? []))];
      const siteKinds = [...new Set(reads.site.flatMap((v) => w.site.get(v) ?? []))];
      refs = [...sensorsOf(station, stationKinds), ...siteSensors(siteKinds)];
      recordInputs.set(id, refs);
    }
    return refs;
  };
  const transectInputs = new Map<string, Ref[]>();
  const transectRefs = (id: string): Ref[] => {
    let refs = transectInputs.get(id);
    if (refs === undefined) {
      const tr = config.transects[id] as TransectConfig | undefined;
      refs =
        tr === undefined
          ? []
          : [
              ...sensorsOf(tr.upstream, FLUX_INPUT_KINDS.station),
              ...sensorsOf(tr.downstream, FLUX_INPUT_KINDS.station),
              ...sensorsOf(tr.current, FLUX_INPUT_KINDS.current),
              ...siteSensors(FLUX_INPUT_KINDS.site),
            ];
      transectInputs.set(id, refs);
    }
    return refs;
  };

  return {
    calibration,
    inputsCalibratedAt(station, kind, tMs) {
      if (calibration.size === 0) return false;
      return inputsOf(station, kind).some((r) => inForce(calibration.bySensor.get(r.key), tMs, tMs + 1));
    },
    transectCalibrated(transect, fromMs, toMs) {
      if (calibration.size === 0) return false;
      return transectRefs(transect).some((r) => inForce(calibration.bySensor.get(r.key), fromMs, toMs));
    },
  };
}
