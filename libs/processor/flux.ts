// Transect fluxes on the event-time cadence (docs/methods/conventions.md 1.5; docs/methods/metabolism.md 6):
// station block means over the window of length W ending at each cadence tick, the previous window W earlier
// for storage, and the metabolism library's budget. A window is computed once, when the watermark passes its
// end.
import type { FluxRecord, ReefdConfig, TransectConfig } from '../contract/index.js';
import {
  computeTransectFlux,
  makeTransectParams,
  windowMean,
  type FluxResult,
  type StationWindowMean,
  type TransectParams,
  type TransectWindow,
} from '../metabolism/index.js';
import { medianIntervalMs, type Series } from './series.js';
import type { ProcessorState, StationVar } from './state.js';

const MIN = 60_000;

export function transectParams(config: ReefdConfig, tr: TransectConfig): TransectParams {
  const mastWind = Object.values(config.stations)
    .flatMap((s) => Object.values(s.sensors))
    .find((s) => s.kind === 'met');
  return makeTransectParams({
    lengthM: tr.length_m,
    bearingDeg: tr.bearing_deg ?? config.reef_axis_deg,
    pq: tr.pq,
    windowMin: config.processing.window_min,
    minSpeedMS: tr.min_speed_m_s,
    maxAngleDeg: tr.max_angle_deg,
    maxResidenceMin: tr.max_residence_min,
    swapOnReverse: tr.swap_on_reverse,
    xco2AirPpm: config.processing.xco2_air_ppm,
    taS35UmolKg: config.alkalinity.ta_s35_umol_kg,
    maxPreviousGapMin: 2 * config.processing.window_min,
    ...(mastWind?.kind === 'met' ? { windHeightM: mastWind.wind_height_m } : {}),
  });
}

interface Mean {
  mean: number;
  sem: number;
  flag: number;
}

/** Block mean of a series over [start, end), expecting samples at the series' observed interval. */
function mean(s: Series, startMs: number, endMs: number): Mean | undefined {
  const interval = medianIntervalMs(s, 15, endMs);
  const expected =
    interval !== undefined && interval > 0 ? Math.max(1, Math.floor((endMs - startMs) / interval)) : 1;
  const r = windowMean(s.t, s.v, s.f, startMs, endMs, expected);
  return r.mean === null ? undefined : { mean: r.mean, sem: r.sem, flag: r.flag };
}

function stationMean(
  state: ProcessorState,
  station: string,
  startMs: number,
  endMs: number,
): { mean?: StationWindowMean; missing: string[] } {
  const st = state.stations[station];
  const missing: string[] = [];
  if (!st) return { missing: ['station'] };
  const get = (v: StationVar) => mean(st[v], startMs, endMs);
  const temp = get('temp');
  const sal = get('sal');
  const o2 = get('o2');
  const depth = get('depth');
  if (!temp) missing.push(`${station}.temp`);
  if (!sal) missing.push(`${station}.sal`);
  if (!o2) missing.push(`${station}.o2`);
  if (!depth) missing.push(`${station}.depth`);
  if (!temp || !sal || !o2 || !depth) return { missing };
  const m: StationWindowMean = {
    tempC: temp.mean,
    salinity: sal.mean,
    o2UmolKg: o2.mean,
    depthM: depth.mean,
    flag: Math.max(temp.flag, sal.flag, depth.flag) as StationWindowMean['flag'],
    o2Flag: o2.flag as StationWindowMean['flag'],
    semO2UmolKg: o2.sem,
  };
  const pco2 = get('pco2');
  if (pco2) {
    m.pco2Uatm = pco2.mean;
    m.pco2Flag = pco2.flag as StationWindowMean['flag'];
    m.semPco2Uatm = pco2.sem;
  }
  // TA with a biological gradient comes only from bottles (or a TA sensor) in the window; TA from salinity
  // never enters the TA budget (docs/methods/metabolism.md 6.3).
  const ta = get('sampleTa');
  if (ta) {
    m.taUmolKg = ta.mean;
    m.taSource = 'sample';
    m.taFlag = ta.flag as StationWindowMean['flag'];
    m.semTaUmolKg = ta.sem;
  }
  const dic = get('sampleDic');
  if (dic) {
    m.dicUmolKg = dic.mean;
    m.dicFlag = dic.flag as StationWindowMean['flag'];
    m.semDicUmolKg = dic.sem;
  }
  return { mean: m, missing };
}

/**
 * The velocity of a window whose current station has no valid ensemble, from the fitted flow model
 * (forecast-step.ts), or undefined when there is none or the gap is too long.
 */
export type FlowFallback = (startMs: number, endMs: number) => ModelledVelocity | undefined;

export interface ModelledVelocity {
  eastMS: number;
  northMS: number;
  sigmaUMS: number;
}

function transectWindow(
  state: ProcessorState,
  tr: TransectConfig,
  startMs: number,
  endMs: number,
  fallback?: FlowFallback,
): { window?: TransectWindow; missing: string[]; modelled?: boolean } {
  const up = stationMean(state, tr.upstream, startMs, endMs);
  const down = stationMean(state, tr.downstream, startMs, endMs);
  const cur = state.stations[tr.current];
  const east = cur ? mean(cur.east, startMs, endMs) : undefined;
  const north = cur ? mean(cur.north, startMs, endMs) : undefined;
  // No valid ensemble: the flow model carries the budget over the gap, flagged 3 (docs/methods/forecast.md 11.3).
  const model = !east || !north ? fallback?.(startMs, endMs) : undefined;
  const missing = [...up.missing, ...down.missing];
  if ((!east || !north) && !model) missing.push(`${tr.current}.current`);
  if (!up.mean || !down.mean || (!model && (!east || !north))) return { missing };
  const currentDepth = cur ? mean(cur.depth, startMs, endMs) : undefined;
  const w: TransectWindow = {
    tCentreMs: (startMs + endMs) / 2,
    up: up.mean,
    down: down.mean,
    eastMS: model ? model.eastMS : (east as Mean).mean,
    northMS: model ? model.northMS : (north as Mean).mean,
    currentFlag: (model
      ? 3
      : Math.max((east as Mean).flag, (north as Mean).flag)) as TransectWindow['currentFlag'] & number,
    ...(model ? { sigmaUMS: model.sigmaUMS } : {}),
    ...(currentDepth ? { currentDepthM: currentDepth.mean } : {}),
  };
  const wind = mean(state.site.wind, startMs, endMs);
  const baro = mean(state.site.baro, startMs, endMs);
  const xco2 = mean(state.site.xco2, startMs, endMs);
  if (wind) w.windMS = wind.mean;
  if (baro) w.baroHpa = baro.mean;
  if (xco2) w.xco2AirPpm = xco2.mean;
  if (wind || baro)
    w.metFlag = Math.max(wind?.flag ?? 1, baro?.flag ?? 1) as TransectWindow['metFlag'] & number;
  return { window: w, missing, ...(model ? { modelled: true } : {}) };
}

/** True when any of the transect's stations has a sample in [start, end): empty stretches emit nothing. */
function hasData(state: ProcessorState, tr: TransectConfig, startMs: number, endMs: number): boolean {
  for (const id of [tr.upstream, tr.downstream, tr.current]) {
    const st = state.stations[id];
    if (!st) continue;
    for (const v of ['o2', 'temp', 'depth', 'east'] as const) {
      const s = st[v];
      const n = s.t.length;
      if (n > 0 && (s.t[n - 1] as number) >= startMs && (s.t[0] as number) < endMs) {
        for (const t of s.t) if (t >= startMs && t < endMs) return true;
      }
    }
  }
  return false;
}

const fin = (x: number | null | undefined): number | null =>
  x === null || x === undefined || !Number.isFinite(x) ? null : x;

/**
 * |value| > 2 sigma (docs/contract-v1.md, flux): a window's NCP or NEC distinguishable from zero at about 95 %.
 * False when the value or its sigma is missing.
 */
export function significant(value: number | null | undefined, sigma: number | null | undefined): boolean {
  const v = fin(value);
  const s = fin(sigma);
  return v !== null && s !== null && Math.abs(v) > 2 * s;
}

/** A flux record always carries its QARTOD flag (9 when the window could not be computed). */
export type FlaggedFluxRecord = FluxRecord & { flag: number };

/** The record of a window whose inputs are missing (`missing` names them, e.g. `back.o2`). */
function missingFluxRecord(site: string, t: string, transect: string, missing: string[]): FlaggedFluxRecord {
  return {
    type: 'flux',
    site,
    t,
    transect,
    ncp_mmol_m2_h: null,
    nec_mmol_m2_h: null,
    nec_method: null,
    u_m_s: null,
    depth_m: null,
    residence_min: null,
    valid: false,
    ncp_significant: false,
    nec_significant: false,
    flag: 9,
    invalid_reasons: 'input_missing',
    missing: missing.join(','),
  };
}

/** The record of a computed window. */
function fluxRecord(
  site: string,
  t: string,
  transect: string,
  tr: TransectConfig,
  r: FluxResult,
): FlaggedFluxRecord {
  const rec: FlaggedFluxRecord = {
    type: 'flux',
    site,
    t,
    transect,
    ncp_mmol_m2_h: fin(r.ncpMmolM2H),
    nec_mmol_m2_h: fin(r.necMmolM2H),
    nec_method: r.necMethod,
    u_m_s: fin(r.uMS),
    depth_m: fin(r.depthM),
    residence_min: fin(r.residenceMin),
    valid: r.valid,
    ncp_significant: significant(r.ncpMmolM2H, r.sigmaNcpMmolM2H),
    nec_significant: significant(r.necMmolM2H, r.sigmaNecMmolM2H),
    flag: r.flag,
    ncp_sigma_mmol_m2_h: fin(r.sigmaNcpMmolM2H),
    nec_sigma_mmol_m2_h: fin(r.sigmaNecMmolM2H),
    invalid_reasons: r.invalidReasons.join(','),
    upstream: r.swapped ? tr.downstream : tr.upstream,
    downstream: r.swapped ? tr.upstream : tr.downstream,
    angle_off_deg: fin(r.angleOffDeg),
    storage_fraction: fin(r.storageFractionO2),
  };
  if (r.airSea) {
    rec.fas_o2_mmol_m2_h = fin(r.airSea.fasO2MmolM2H);
    rec.fas_co2_mmol_m2_h = fin(r.airSea.fasCo2MmolM2H);
  }
  if (r.necInverseMmolM2H !== null) rec.nec_inverse_mmol_m2_h = fin(r.necInverseMmolM2H);
  if (r.notes.length > 0) rec.notes = r.notes.join(',');
  return rec;
}

/**
 * The causes, among a transect's input sensors, that make a window over [fromMs, toMs) invalid (faults in force
 * and failed samples, docs/methods/faults.md 12.7), e.g. `input_fault:back/co2-back/flatline`; `withoutCurrent`:
 * leaving out the current station's ADCP (a window on modelled flow does not read it).
 */
export type InputReasons = (
  transect: string,
  fromMs: number,
  toMs: number,
  withoutCurrent?: boolean,
) => string[];

/**
 * A window whose input sensors had a fault or a failed sample is not valid (docs/contract-v1.md, E3): flag 4 (a
 * missing window keeps 9), those reasons first, then the window's own.
 */
function invalidate(rec: FlaggedFluxRecord, reasons: readonly string[]): void {
  if (reasons.length === 0) return;
  rec.valid = false;
  if (rec.flag < 4) rec.flag = 4;
  const own = rec.invalid_reasons ? rec.invalid_reasons.split(',') : [];
  rec.invalid_reasons = [...reasons, ...own.filter((x) => !reasons.includes(x))].join(',');
}

/**
 * The flux record of one transect for the window ending at endMs, or undefined when none of its stations has
 * data in it. `withNext`: the window is computed a window late, with the next window's means for a centred O2
 * storage term where they exist (docs/methods/metabolism.md 6.1; storage-hold.ts).
 */
export function transectFluxAt(
  config: ReefdConfig,
  state: ProcessorState,
  id: string,
  endMs: number,
  p: TransectParams,
  inputReasons: InputReasons = () => [],
  withNext = false,
  fallback?: FlowFallback,
): FlaggedFluxRecord | undefined {
  const tr = config.transects[id] as TransectConfig;
  const W = config.processing.window_min * MIN;
  const startMs = endMs - W;
  if (!hasData(state, tr, startMs, endMs)) return undefined;
  const cur = transectWindow(state, tr, startMs, endMs, fallback);
  const t = new Date(endMs - W / 2).toISOString();
  const results = (state.transects[id] ??= {});
  if (!cur.window) {
    const rec = missingFluxRecord(config.site, t, id, cur.missing);
    invalidate(rec, inputReasons(id, startMs, endMs));
    return rec;
  }
  const prev = transectWindow(state, tr, startMs - W, startMs, fallback).window;
  const next = withNext ? transectWindow(state, tr, endMs, endMs + W, fallback).window : undefined;
  const prevResult = results[String(startMs)] as FluxResult | undefined;
  const r = computeTransectFlux(cur.window, prev, p, {
    ...(prevResult ? { previousResult: prevResult } : {}),
    ...(next ? { next } : {}),
  });
  if (cur.modelled) r.notes.push('modelled_flow');
  // The storage form of the next window's inverse needs this one's result (kept for three windows: a window
  // computed a window late still finds its previous one's).
  results[String(endMs)] = r;
  for (const k of Object.keys(results)) if (Number(k) < endMs - 3 * W) delete results[k];
  const rec = fluxRecord(config.site, t, id, tr, r);
  // The storage term read the previous window's means too, and the next one's when centred.
  const from = r.notes.includes('no_storage') ? startMs : startMs - W;
  // With modelled flow the current station's ADCP is not an input of the window.
  const to = r.notes.includes('storage_centred') ? endMs + W : endMs;
  invalidate(rec, inputReasons(id, from, to, cur.modelled === true));
  return rec;
}
