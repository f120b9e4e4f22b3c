// The forecast's incremental state, for the event-time processor: plain JSON (part of the checkpoint), fed
// with the derived records as they are made (docs/methods/forecast.md 11.7). Observations go into block
// means; models are refitted once a day from them; forecasts are issued at dusk and hourly until sunrise and
// scored at sunrise, and the scores calibrate the next nights' intervals.
import { addSample, createBlocks, latest, pruneBefore, valueAt, type Blocks } from './blocks.js';
import type { BoxModel } from './box-model.js';
import type { FlowModel } from './flow-model.js';
import type { TideFit } from './harmonics.js';

export const FORECAST_STATE_VERSION = 1;

/** One forecast as issued, kept until it is scored at sunrise. */
export interface IssuedForecast {
  station: string;
  issueMs: number;
  sunriseMs: number;
  /** Hours since dusk (0 for the dusk issue). */
  lead: number;
  /** The model's central minimum before calibration, and its members' 10-90 % half-widths, mg/L. */
  rawMgL: number;
  halfLoMgL: number;
  halfHiMgL: number;
  /** The model that made it (a station's errors calibrate the model in use only). */
  model?: 'persistence' | 'transect' | 'box';
}

/** A scored forecast: observed minus raw central minimum, with the members' half-widths. */
export interface ForecastError {
  issueMs: number;
  lead: number;
  errMgL: number;
  halfLoMgL: number;
  halfHiMgL: number;
  model?: 'persistence' | 'transect' | 'box';
}

export interface ModelFits {
  fittedAtMs: number;
  tide: Record<string, TideFit | null>;
  flow: Record<string, FlowModel | null>;
  box: Record<string, BoxModel | null>;
}

export interface NightState {
  duskMs: number;
  sunriseMs: number;
  nextIssueMs: number;
  issued: IssuedForecast[];
  /** Stations whose own data showed an anomaly tonight (respiration far above the fitted one). */
  anomalies: string[];
}

export interface ForecastState {
  version: number;
  /** O2 (mg/L) and water depth (m) per station; offshore Hm0 (m); PAR (umol m-2 s-1). */
  o2: Record<string, Blocks>;
  depth: Record<string, Blocks>;
  offshore: Blocks;
  par: Blocks;
  /** Per transect: velocity along it at the current station (m/s) and the depth there (m), as block means of
   * the valid ensembles (the flow model is fitted on these, paired with the offshore height). */
  flowU: Record<string, Blocks>;
  flowDepth: Record<string, Blocks>;
  /** Night respiration per transect (mmol m-2 h-1), one row per night (from the daily budgets). */
  resp: Record<string, { tMs: number; rMmolM2H: number; sigma: number }[]>;
  fits: ModelFits | null;
  night: NightState | null;
  errors: Record<string, ForecastError[]>;
  /** Nights (dusk, sunrise) flagged anomalous per station: kept out of the box fit and the calibration. */
  anomalies: Record<string, [number, number][]>;
  /** Event time up to which the schedule has run, ms (null before the first step). */
  lastStepMs: number | null;
}

export function createForecastState(): ForecastState {
  return {
    version: FORECAST_STATE_VERSION,
    o2: {},
    depth: {},
    offshore: createBlocks(),
    par: createBlocks(),
    flowU: {},
    flowDepth: {},
    resp: {},
    fits: null,
    night: null,
    errors: {},
    anomalies: {},
    lastStepMs: null,
  };
}

const blocksOf = (m: Record<string, Blocks>, k: string, blockMs?: number) => (m[k] ??= createBlocks(blockMs));

/** An oxygen record of a station (mg/L). */
export function observeOxygen(s: ForecastState, station: string, tMs: number, o2MgL: number): void {
  addSample(blocksOf(s.o2, station), tMs, o2MgL);
}

/** A mean water depth of a station (a waves record's depth_m). */
export function observeDepth(s: ForecastState, station: string, tMs: number, depthM: number): void {
  // 30-min blocks: the tide needs a month of them, and bursts come every 30 min anyway.
  addSample(blocksOf(s.depth, station, 30 * 60_000), tMs, depthM);
}

/** Hm0 at the outermost pressure station (a waves record's hm0_m). */
export function observeOffshoreWaves(s: ForecastState, tMs: number, hm0M: number): void {
  addSample(s.offshore, tMs, hm0M);
}

/** A PAR sample of the site (dusk from the light where a PAR sensor reports). */
export function observePar(s: ForecastState, tMs: number, parUmolM2S: number): void {
  addSample(s.par, tMs, parUmolM2S);
}

/** A valid current ensemble at a transect's current station: velocity along the transect (m/s, downstream
 * positive) and the water depth there (m). */
export function observeCurrent(
  s: ForecastState,
  transect: string,
  tMs: number,
  uMS: number,
  depthM: number,
): void {
  addSample(blocksOf(s.flowU, transect), tMs, uMS);
  addSample(blocksOf(s.flowDepth, transect), tMs, depthM);
}

/** The night respiration of a transect (the daily record's r_mmol_m2_h and its sigma), stamped at the day. */
export function observeRespiration(
  s: ForecastState,
  transect: string,
  tMs: number,
  rMmolM2H: number,
  sigma: number,
): void {
  if (!(rMmolM2H > 0) || !Number.isFinite(sigma)) return;
  const rows = (s.resp[transect] ??= []);
  rows.push({ tMs, rMmolM2H, sigma });
  rows.sort((a, b) => a.tMs - b.tMs);
  if (rows.length > 14) rows.splice(0, rows.length - 14);
}

/** Drops everything older than the history each part needs. */
export function pruneState(
  s: ForecastState,
  tMs: number,
  o: { historyDays: number; tideDays: number; flowDays: number },
): void {
  const day = 86_400_000;
  for (const b of Object.values(s.o2)) pruneBefore(b, tMs - o.historyDays * day);
  for (const b of Object.values(s.depth)) pruneBefore(b, tMs - o.tideDays * day);
  pruneBefore(s.offshore, tMs - o.historyDays * day);
  pruneBefore(s.par, tMs - 2 * day);
  for (const m of [s.flowU, s.flowDepth])
    for (const b of Object.values(m)) pruneBefore(b, tMs - o.historyDays * day);
  for (const [k, spans] of Object.entries(s.anomalies))
    s.anomalies[k] = spans.filter(([, to]) => to >= tMs - o.historyDays * day);
}

export { latest, valueAt };
