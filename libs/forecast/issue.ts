// Issuing tonight's forecasts (docs/methods/forecast.md 11.5-11.7): the station models are built from the
// state at the issue time (only data before it), run by forecastNight, then calibrated by the station's own
// scored nights: the median error is added as a bias and the error variance the members do not explain is
// added to the interval (model output statistics in their simplest form, common practice in forecasting).
import { sunEvents } from '../daily/index.js';
import { blockMeans, meanOver, valueAt, type Blocks } from './blocks.js';
import { calibration, Z80 } from './calibration.js';
import { predictTide } from './harmonics.js';
import { forecastNight, type FlowSource, type StationForecast, type StationModel } from './night.js';
import type { ForecastPlan, PlanStation } from './plan.js';
import { O2_MG_L_PER_MMOL_M3, type BoxModel } from './box-model.js';
import type { ForecastState, ModelFits } from './state.js';

export interface IssueOptions {
  members: number;
  /** Model error sd before any night has been scored, mg/L (engineering default 0.25). */
  defaultModelSigmaMgL: number;
  /** Fewest scored forecasts for a calibration (default 3). */
  minCalibration: number;
}

const HOUR = 3_600_000;

export interface CalibratedForecast extends StationForecast {
  /** The station's own data tonight departed from its model (see assimilateBox). */
  anomalous: boolean;
  rawMgL: number;
  biasMgL: number;
  modelSigmaMgL: number;
  halfLoMgL: number;
  halfHiMgL: number;
}

/** Predicted depth of a station: the tide fit plus the mean residual of the last three hours (setup, surge),
 * or the last depth held when there is no fit. */
function depthPredictor(
  s: ForecastState,
  fits: ModelFits,
  station: string,
  T: number,
): ((t: number) => number) | undefined {
  const b = s.depth[station];
  if (!b) return undefined;
  const recent = blockMeans(b, T - 3 * HOUR, T);
  if (recent.v.length === 0) return undefined;
  const fit = fits.tide[station];
  if (!fit) {
    const last = recent.v[recent.v.length - 1] as number;
    return () => last;
  }
  const resid =
    recent.v.reduce((a, v, i) => a + v - predictTide(fit, recent.tMs[i] as number), 0) / recent.v.length;
  // The ensemble asks for the same grid times again and again: remember them.
  const cache = new Map<number, number>();
  return (t) => {
    let d = cache.get(t);
    if (d === undefined) {
      d = Math.max(0.05, predictTide(fit, t) + resid);
      cache.set(t, d);
    }
    return d;
  };
}

function flowSource(
  s: ForecastState,
  fits: ModelFits,
  plan: ForecastPlan,
  transect: string,
  T: number,
): FlowSource | undefined {
  const t = plan.transects.find((x) => x.id === transect);
  const flow = fits.flow[transect];
  if (!t || !flow) return undefined;
  const currentDepthM = depthPredictor(s, fits, t.current, T);
  return currentDepthM ? { flow, currentDepthM } : undefined;
}

/** Night respiration of a transect: the mean of its last three nights, with the larger of their spread and
 * their propagated sigma. */
function respiration(
  s: ForecastState,
  transect: string,
  T: number,
): { r: number; sigma: number } | undefined {
  const rows = (s.resp[transect] ?? []).filter((x) => x.tMs < T).slice(-3);
  if (rows.length === 0) return undefined;
  const r = rows.reduce((a, x) => a + x.rMmolM2H, 0) / rows.length;
  const sd =
    rows.length > 1 ? Math.sqrt(rows.reduce((a, x) => a + (x.rMmolM2H - r) ** 2, 0) / (rows.length - 1)) : 0;
  const prop = Math.sqrt(rows.reduce((a, x) => a + x.sigma ** 2, 0)) / rows.length;
  return { r, sigma: Math.max(sd, prop) };
}

/** Dusks of the nights before tonight (at most `nights`), from the sun. */
function pastDusks(plan: ForecastPlan, duskMs: number, nights: number): number[] {
  const out: number[] = [];
  for (let n = 1; n <= nights; n++) {
    const around = duskMs - n * 24 * HOUR;
    const set = sunEvents(around - 3 * HOUR, around + 3 * HOUR, plan.latDeg, plan.lonDeg).find(
      (e) => e.kind === 'set',
    );
    if (set) out.push(set.tMs);
  }
  return out;
}

/** Fewest past nights for a station's course: one or two nights (an event among them) say too little. */
const MIN_COURSE_NIGHTS = 3;

/** The station's median course through past nights, aligned on dusk, relative to the value at the same time
 * after dusk as now; and the sd across nights of the drop to their minimum (docs/methods/forecast.md 11.5).
 * The median, so that one anomalous night among them does not set the course of the next. */
function climatology(
  b: Blocks,
  night: { duskMs: number; sunriseMs: number },
  T: number,
  dusks: readonly number[],
): { drift: (t: number) => number; sigma: number } | undefined {
  const rows: { dusk: number; base: number }[] = [];
  const drops: number[] = [];
  for (const d of dusks) {
    const base = valueAt(b, d + (T - night.duskMs), HOUR, T);
    if (base === undefined) continue;
    rows.push({ dusk: d, base });
    const m = blockMeans(b, d + (T - night.duskMs), d + (night.sunriseMs - night.duskMs)).v;
    if (m.length > 2) drops.push(Math.min(...m) - base);
  }
  if (rows.length < MIN_COURSE_NIGHTS) return undefined;
  const cache = new Map<number, number>();
  const drift = (t: number) => {
    const hit = cache.get(t);
    if (hit !== undefined) return hit;
    const ds: number[] = [];
    for (const r of rows) {
      const v = valueAt(b, r.dusk + (t - night.duskMs), HOUR, T);
      if (v !== undefined) ds.push(v - r.base);
    }
    ds.sort((x, y) => x - y);
    const d = ds.length ? 0.5 * ((ds[(ds.length - 1) >> 1] as number) + (ds[ds.length >> 1] as number)) : 0;
    cache.set(t, d);
    return d;
  };
  const mean = drops.reduce((a, x) => a + x, 0) / Math.max(1, drops.length);
  const sd =
    drops.length > 1 ? Math.sqrt(drops.reduce((a, x) => a + (x - mean) ** 2, 0) / (drops.length - 1)) : 0.1;
  return { drift, sigma: sd };
}

/** Median of observed minus modelled O2 of a transect's downstream station over the dark hours of past
 * nights (from two hours after dusk, when the water has lost the day's oxygen) and of tonight so far: a
 * persistent offset between the stations' sensors, or a bias of R, PQ or air-sea exchange. */
function transectOffset(
  s: ForecastState,
  t: { id: string; upstream: string; downstream: string; lengthM: number },
  rMmolM2H: number,
  night: { duskMs: number; sunriseMs: number },
  T: number,
  dusks: readonly number[],
): number {
  const down = s.o2[t.downstream];
  const up = s.o2[t.upstream];
  const u = s.flowU[t.id];
  const hc = s.flowDepth[t.id];
  if (!down || !up || !u || !hc) return 0;
  const spans = dusks.map((d) => [d + 2 * HOUR, d + (night.sunriseMs - night.duskMs)] as const);
  if (T - night.duskMs >= 2.5 * HOUR) spans.push([night.duskMs + 2 * HOUR, T] as const);
  const res: number[] = [];
  for (const [from, to] of spans) {
    const m = blockMeans(down, from, to);
    m.tMs.forEach((x, i) => {
      const o = valueAt(up, x, HOUR, T);
      const ux = valueAt(u, x, HOUR, T);
      const h = valueAt(hc, x, HOUR, T);
      if (o === undefined || ux === undefined || h === undefined || !(ux > 0.01)) return;
      // The night model's drop (night.ts): R c L / (u_c h_c).
      const drop = (rMmolM2H * O2_MG_L_PER_MMOL_M3 * (t.lengthM / ux / 3600)) / h;
      res.push((m.v[i] as number) - (o - drop));
    });
  }
  if (res.length === 0) return 0;
  res.sort((a, b) => a - b);
  return 0.5 * ((res[(res.length - 1) >> 1] as number) + (res[res.length >> 1] as number));
}

function buildModel(
  s: ForecastState,
  fits: ModelFits,
  plan: ForecastPlan,
  p: PlanStation,
  T: number,
  night: { duskMs: number; sunriseMs: number },
  dusks: readonly number[],
): StationModel | undefined {
  const b = s.o2[p.station];
  const now = b && meanOver(b, T - HOUR / 2, T);
  if (!b || now === undefined) return undefined;
  const clim = climatology(b, night, T, dusks);
  const persistence: StationModel = {
    kind: 'persistence',
    station: p.station,
    o2NowMgL: now,
    sigmaMgL: clim?.sigma ?? 0.1,
    ...(clim ? { driftMgL: clim.drift } : {}),
  };
  if (p.kind === 'persistence') return persistence;
  if (p.kind === 'transect') {
    const t = plan.transects.find((x) => x.id === p.transect)!;
    const flow = flowSource(s, fits, plan, t.id, T);
    const resp = respiration(s, t.id, T);
    if (!flow || !resp) return persistence;
    return {
      kind: 'transect',
      station: p.station,
      upstream: t.upstream,
      lengthM: t.lengthM,
      rMmolM2H: resp.r,
      rSigmaMmolM2H: resp.sigma,
      flow,
      offsetMgL: transectOffset(s, t, resp.r, night, T, dusks),
    };
  }
  const fitted = fits.box[p.station];
  const depthM = depthPredictor(s, fits, p.station, T);
  const feed = flowSource(s, fits, plan, p.feed, T);
  if (!fitted || !depthM || !feed) return persistence;
  const tonight = assimilateBox(s, p, fitted, night, T);
  return {
    kind: 'box',
    station: p.station,
    source: p.source,
    o2NowMgL: now,
    box: tonight?.box ?? fitted,
    depthM,
    feed,
    anomalous: tonight !== undefined,
    ...(tonight && tonight.growthMmolM2H2 > 0
      ? { rGrowthMmolM2H2: tonight.growthMmolM2H2, rGrowthForH: GROWTH_FOR_H }
      : {}),
  };
}

/** Hours over which a rising demand found tonight is carried on before it is held (one issue interval: the
 * next forecast measures it again). */
const GROWTH_FOR_H = 1;

/** Theil-Sen line through (t, r): the median of the pairwise slopes (per hour) and the level at tMs. */
function theilSen(
  ts: readonly number[],
  rs: readonly number[],
  tMs: number,
): { level: number; slope: number } {
  const slopes: number[] = [];
  for (let i = 0; i < ts.length; i++)
    for (let j = i + 1; j < ts.length; j++)
      if ((ts[j] as number) !== (ts[i] as number))
        slopes.push(
          ((rs[j] as number) - (rs[i] as number)) / (((ts[j] as number) - (ts[i] as number)) / HOUR),
        );
  const med = (xs: number[]) => {
    const v = [...xs].sort((a, b) => a - b);
    return v.length ? 0.5 * ((v[(v.length - 1) >> 1] as number) + (v[v.length >> 1] as number)) : 0;
  };
  const slope = med(slopes);
  return { slope, level: med(rs.map((r, i) => r - (slope * ((ts[i] as number) - tMs)) / HOUR)) };
}

/** Tonight's own respiration of a box, from its last two dark hours (the budget solved for R with the fitted
 * exchange); when it is clearly above the fitted R (more than three of its sigmas: a bloom's decay, a calm
 * stratified night) the night is anomalous and the rate now (a Theil-Sen line through the two hours, at T)
 * replaces the fitted R, with the difference as its sigma, and a rising rate is carried on for an hour. The
 * forecasts after dusk then follow an event the history could not foresee (docs/methods/forecast.md 11.4). */
function assimilateBox(
  s: ForecastState,
  p: { station: string; source: string; feed: string },
  box: BoxModel,
  night: { duskMs: number },
  T: number,
): { box: BoxModel; growthMmolM2H2: number } | undefined {
  const from = Math.max(night.duskMs + HOUR, T - 2 * HOUR);
  const b = s.o2[p.station];
  const src = s.o2[p.source];
  const h = s.depth[p.station];
  const u = s.flowU[p.feed];
  const hc = s.flowDepth[p.feed];
  if (!b || !src || !h || !u || !hc || T - from < HOUR) return undefined;
  const m = blockMeans(b, from, T);
  const r: number[] = [];
  const rt: number[] = [];
  for (let i = 1; i < m.tMs.length; i++) {
    const t0 = m.tMs[i - 1] as number;
    const t1 = m.tMs[i] as number;
    const tm = (t0 + t1) / 2;
    const [o2s, hh, uc, dc] = [
      valueAt(src, tm, HOUR, T),
      valueAt(h, tm, HOUR, T),
      valueAt(u, tm, HOUR, T),
      valueAt(hc, tm, HOUR, T),
    ];
    if (o2s === undefined || hh === undefined || uc === undefined || dc === undefined) continue;
    const k = box.kappa * ((Math.max(0, uc) * 3600 * dc) / hh);
    const o2 = 0.5 * ((m.v[i - 1] as number) + (m.v[i] as number));
    const dOdt = ((m.v[i] as number) - (m.v[i - 1] as number)) / ((t1 - t0) / HOUR);
    r.push(((k * (o2s - o2) - dOdt) * hh) / O2_MG_L_PER_MMOL_M3);
    rt.push(tm);
  }
  if (r.length < 4) return undefined;
  const line = theilSen(rt, r, T);
  r.sort((a, c) => a - c);
  const med = 0.5 * ((r[(r.length - 1) >> 1] as number) + (r[r.length >> 1] as number));
  const sdFit = Math.sqrt(Math.max(0, box.cov[3] as number));
  const spread = 1.4826 * (r.map((x) => Math.abs(x - med)).sort((a, c) => a - c)[r.length >> 1] as number);
  const sigma = Math.max(sdFit, spread / Math.sqrt(r.length));
  if (!(med - box.rMmolM2H > 3 * sigma)) return undefined;
  const rNow = Math.max(med, line.level);
  const extra = ((rNow - box.rMmolM2H) / 2) ** 2;
  return {
    box: { ...box, rMmolM2H: rNow, cov: [box.cov[0] as number, 0, 0, (box.cov[3] as number) + extra] },
    growthMmolM2H2: Math.max(0, line.slope),
  };
}

/** Offshore Hm0 now (mean of the last two hours) and the sd of ln Hm0 changes over six hours in the record. */
function offshoreNow(s: ForecastState, T: number): { hm0: number; lnSigma: number } | undefined {
  const recent = meanOver(s.offshore, T - 2 * HOUR, T);
  if (recent === undefined || !(recent > 0)) return undefined;
  const m = blockMeans(s.offshore, -Infinity, T);
  const d: number[] = [];
  for (let i = 0, j = 0; i < m.tMs.length; i++) {
    while (j < m.tMs.length && (m.tMs[j] as number) < (m.tMs[i] as number) + 6 * HOUR) j++;
    if (j < m.tMs.length && (m.tMs[j] as number) - (m.tMs[i] as number) < 6.5 * HOUR)
      d.push(Math.log((m.v[j] as number) / (m.v[i] as number)));
  }
  const sd = d.length > 10 ? Math.sqrt(d.reduce((a, x) => a + x * x, 0) / d.length) : 0.15;
  return { hm0: recent, lnSigma: sd };
}

/** Forecasts of every station of the plan that can be forecast at T, calibrated. */
export function issueAt(
  s: ForecastState,
  plan: ForecastPlan,
  fits: ModelFits,
  T: number,
  night: { duskMs: number; sunriseMs: number },
  lead: number,
  o: IssueOptions,
): CalibratedForecast[] {
  const off = offshoreNow(s, T);
  const dusks = pastDusks(plan, night.duskMs, 7);
  const sunriseMs = night.sunriseMs;
  const models: StationModel[] = [];
  for (const p of plan.stations) {
    const m = buildModel(s, fits, plan, p, T, night, dusks);
    if (!m) continue;
    const needs = m.kind === 'transect' ? m.upstream : m.kind === 'box' ? m.source : undefined;
    // Without an offshore height (or the station that drives it) the physics cannot run: persistence.
    if (
      (m.kind !== 'persistence' && !off) ||
      (needs !== undefined && !models.some((x) => x.station === needs))
    )
      models.push({
        kind: 'persistence',
        station: p.station,
        o2NowMgL: meanOver(s.o2[p.station]!, T - HOUR, T)!,
        sigmaMgL: 0.05,
      });
    else models.push(m);
  }
  if (models.length === 0) return [];
  const raw = forecastNight(models, {
    issueMs: T,
    endMs: sunriseMs,
    hm0OffshoreM: off?.hm0 ?? 1,
    hm0LnSigma: off?.lnSigma ?? 0.15,
    members: o.members,
  });
  return raw.map((f) => {
    // The errors of the model in use: a station forecast by persistence until its model could be fitted
    // starts its calibration afresh.
    const errors = (s.errors[f.station] ?? []).filter((e) => e.model === undefined || e.model === f.kind);
    const c = calibration(errors, lead, o);
    const halfLo = f.o2MinMgL - f.loMgL;
    const halfHi = f.hiMgL - f.o2MinMgL;
    const centre = Math.max(0, f.o2MinMgL + c.bias);
    const model = models.find((m) => m.station === f.station);
    return {
      ...f,
      anomalous: model?.kind === 'box' && model.anomalous === true,
      rawMgL: f.o2MinMgL,
      o2MinMgL: centre,
      loMgL: Math.max(0, centre - c.widen * Math.hypot(c.ensembleScale * halfLo, Z80 * c.sigma)),
      hiMgL: centre + c.widen * Math.hypot(c.ensembleScale * halfHi, Z80 * c.sigma),
      biasMgL: c.bias,
      modelSigmaMgL: c.sigma,
      halfLoMgL: halfLo,
      halfHiMgL: halfHi,
    };
  });
}
