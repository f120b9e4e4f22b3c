// The processor's state: plain JSON data, so a checkpoint is JSON.stringify and a restart resumes the windows.
import type { SensorMessage } from '../contract/index.js';
import { createFaultState, type FaultState } from '../qc/index.js';
import { createReprocessState, type ReprocessState } from './reprocess-state.js';
import { createDailyState, type DailyState } from '../daily/index.js';
import { createForecastState, type ForecastState } from '../forecast/index.js';
import type { Series } from './series.js';
import { createSeries } from './series.js';

export const STATE_VERSION = 2;

/** Per-sensor bookkeeping: duplicate detection, warm starts. */
export interface SensorState {
  lastTMs: number;
  /** Recent sample times and sequence numbers, bounded, for duplicate detection. */
  recentT: number[];
  recentSeq: number[];
  /** `seq` of the newest sample (by time), to recognise a counter that started again. */
  lastSeq?: number;
  /** Last pH solution of a pCO2 sensor: the warm start of the next solve. */
  lastPh?: number;
  count: number;
  /** Supply voltage of the last message that carried one. */
  batteryV?: number;
  /** Worst QARTOD flag among the last message's values and records. */
  lastFlag?: number;
  /** Sample times (ms) of the sensor's values that failed QC (flag 4), recent ones (faults.ts). */
  failedMs?: number[];
  /**
   * What the sensor's last derived message wrote to the series (`s`tation or si`t`e, variable, time) and that
   * message's time: a spike verdict that arrives one sample late marks those samples 4 (dispatch.ts).
   */
  lastPuts?: { at: 's' | 'x'; v: string; t: number }[];
  lastPutsMs?: number;
}

/**
 * The variables the processor remembers per station (time series, bounded in time). Each is written by one
 * kind (its module's `writes`, kinds/<kind>.ts); kinds/index.ts does not compile while one has no writer.
 */
export const STATION_VARS = [
  'temp', // CTD temperature, degC
  'sal', // CTD practical salinity
  'o2', // O2, umol/kg (oxygen records)
  'pco2', // pCO2 at the CTD temperature, uatm (carbonate records)
  'ta', // TA used for the carbonate record, umol/kg
  'dic', // DIC of the carbonate record, umol/kg
  'sampleTa', // bottle TA, umol/kg
  'sampleDic', // bottle DIC, umol/kg
  'sampleSal', // salinity of the bottle sample
  'depth', // mean water depth of a burst, m
  'hm0ss', // sea-swell Hm0 of a burst, m
  'depthDone', // the same depth, stamped when its burst completed (what an ensemble may use)
  'hm0ssDone',
  'burstCentre', // centre time (ms) of the burst of each depthDone sample, stamped with it
  'adcpDepth', // water depth from an ADCP's own pressure at its ensemble time, m
  'east', // depth-averaged current, m/s
  'north',
  'omega', // aragonite saturation of the carbonate records (the daily NEC-Omega fit)
] as const;
export type StationVar = (typeof STATION_VARS)[number];

export const SITE_VARS = ['wind', 'baro', 'xco2', 'par'] as const;
export type SiteVar = (typeof SITE_VARS)[number];

export interface ProcessorCounters {
  accepted: number;
  duplicates: number;
  /** Arrived after the watermark had passed their time (still derived; not in closed windows). */
  late: number;
  /** Sample time more than 1 min after the receive time (clock fault, QARTOD timing test: fail). */
  clockFaults: number;
  unknownSensor: number;
  disabledSensor: number;
  /** Messages whose `seq` started again (logger reboots); their data is kept. Absent until the first. */
  sensorReboots?: number;
  records: Record<string, number>;
  /** Lab results that arrived after their windows closed and were re-derived (revise.ts). */
  lateSamplesRevised: number;
  /** Such lab results older than the live re-derivation reaches (used from then on only; replay places them). */
  lateSamplesNotRevised: number;
  /** Records sent again with a higher `revision` by those re-derivations. */
  revisedRecords: number;
}

export interface ProcessorState {
  version: number;
  /** Highest accepted event time, ms (0 before the first). The watermark is this minus the lateness. */
  maxEventMs: number;
  /** End of the last flux window computed (a cadence tick), ms; -1 before the first. */
  lastTickMs: number;
  sensors: Record<string, SensorState>;
  stations: Record<string, Record<StationVar, Series>>;
  site: Record<SiteVar, Series>;
  /** Sample time of the earliest message derived: the cadence grid starts there. */
  firstDerivedMs?: number;
  /** Messages within the lateness, held in event-time order until the watermark passes them. */
  held: { message: SensorMessage; rxMs: number }[];
  /** Recent flux results per transect, keyed by window end (ms): the storage form of the inverse needs them. */
  transects: Record<string, Record<string, unknown>>;
  /** Flux windows waiting for the next window, for a centred storage term (storage-hold.ts). */
  heldWindows: { transect: string; endMs: number }[];
  /** QC state per `station/sensor/variable` (libs/qc state objects, plain data). */
  qc: Record<string, unknown>;
  /** Alert engine snapshot (libs/alerts). */
  alerts: unknown;
  /** Sensor-fault state (libs/qc sensor-faults.ts, docs/methods/faults.md 12.7), plain data. */
  faults: FaultState;
  counters: ProcessorCounters;
  /** Calibration bookkeeping and the re-derivation of late lab results (reprocess-state.ts). */
  reprocess: ReprocessState;
  /** Daily budgets per transect: the windows of the open days and the sliding week (libs/daily, daily-step.ts). */
  daily: Record<string, DailyState>;
  /** Tonight's oxygen: observations, fitted models, the night's forecasts and scores (libs/forecast). */
  forecast: ForecastState;
}

export function createState(stationIds: readonly string[]): ProcessorState {
  const stations: ProcessorState['stations'] = {};
  for (const id of stationIds) stations[id] = emptyStation();
  const site = Object.fromEntries(SITE_VARS.map((v) => [v, createSeries()])) as Record<SiteVar, Series>;
  return {
    version: STATE_VERSION,
    maxEventMs: 0,
    lastTickMs: -1,
    sensors: {},
    stations,
    site,
    held: [],
    transects: {},
    heldWindows: [],
    qc: {},
    alerts: undefined,
    faults: createFaultState(),
    daily: {},
    forecast: createForecastState(),
    counters: {
      accepted: 0,
      duplicates: 0,
      late: 0,
      clockFaults: 0,
      unknownSensor: 0,
      disabledSensor: 0,
      records: {},
      lateSamplesRevised: 0,
      lateSamplesNotRevised: 0,
      revisedRecords: 0,
    },
    reprocess: createReprocessState(),
  };
}

export function emptyStation(): Record<StationVar, Series> {
  return Object.fromEntries(STATION_VARS.map((v) => [v, createSeries()])) as Record<StationVar, Series>;
}

/**
 * Completes a restored state for the configuration: a station added since the checkpoint, a series added to
 * STATION_VARS or SITE_VARS since, and a fault state absent from an older checkpoint, start empty. So a new series needs no STATE_VERSION bump; a change of
 * what an existing key holds does.
 */
export function completeState(state: ProcessorState, stationIds: readonly string[]): void {
  for (const id of stationIds) {
    const st = (state.stations[id] ??= emptyStation());
    for (const v of STATION_VARS) st[v] ??= createSeries();
  }
  for (const v of SITE_VARS) state.site[v] ??= createSeries();
  // A checkpoint from before the fault state starts it empty: faults re-open on the data.
  state.faults ??= createFaultState();
  state.heldWindows ??= [];
  state.reprocess ??= createReprocessState();
  state.counters.lateSamplesRevised ??= 0;
  state.counters.lateSamplesNotRevised ??= 0;
  state.counters.revisedRecords ??= 0;
  // A checkpoint from before the daily and forecast states starts them empty (they fill from the data).
  state.daily ??= {};
  state.forecast ??= createForecastState();
}

/** The daily state of a transect, created on its first window. */
export function dailyOf(state: ProcessorState, transect: string): DailyState {
  return (state.daily[transect] ??= createDailyState());
}
