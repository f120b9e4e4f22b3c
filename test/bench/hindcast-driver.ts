// The hindcast driver shared by the forecast benchmark: feeds the processor's derived records (in event-time
// order) into the daily and forecast libraries through the calls the processor will make, and pairs every
// forecast with the simulator's truth. Pure apart from the inputs it is given.
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import {
  addWindow,
  closeDueDays,
  createDailyState,
  createLocalCalendar,
  toDailyRecord,
  type DailyRecord,
} from '../../libs/daily/index.js';
import {
  createForecastState,
  observeCurrent,
  observeDepth,
  observeOffshoreWaves,
  observeOxygen,
  observePar,
  observeRespiration,
  planFromConfig,
  stepForecast,
  type ForecastOptions,
  type ForecastRecord,
} from '../../libs/forecast/index.js';

export interface TruthO2 {
  t: string;
  station: string;
  o2_mg_l: number;
}

export interface ScoredForecast {
  station: string;
  model: string;
  issueMs: number;
  sunriseMs: number;
  lead: number;
  central: number;
  lo: number;
  hi: number;
  truthMin: number;
  /** Persistence baseline: the station's O2 at the issue time (truth). */
  persistence: number;
}

const num = (r: DerivedRecord, k: string) =>
  (r as unknown as Record<string, unknown>)[k] as number | null | undefined;

export function runHindcast(
  config: ReefdConfig,
  records: readonly DerivedRecord[],
  par: readonly [number, number][],
  truth: readonly TruthO2[],
  opts: { timeZone: string; forecast?: Partial<ForecastOptions> },
): { scored: ScoredForecast[]; daily: DailyRecord[]; forecasts: ForecastRecord[]; stateBytes: number } {
  const plan = planFromConfig(config);
  const cal = createLocalCalendar(opts.timeZone);
  const W = config.processing.window_min * 60_000;
  const cadenceMin = config.processing.cadence_min;
  const fs = createForecastState();
  const daily = Object.fromEntries(plan.transects.map((t) => [t.id, createDailyState()]));
  const parT = par.map((p) => p[0]);
  const lower = (t: number) => {
    let lo = 0;
    let hi = parT.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((parT[mid] as number) < t) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const parMean = (c: number) => {
    let s = 0;
    let n = 0;
    for (let i = lower(c - W / 2); i < par.length && par[i]![0] < c + W / 2; i++) {
      s += par[i]![1];
      n++;
    }
    return n ? s / n : null;
  };
  // Every input in event-time order, PAR samples included.
  const events: { tMs: number; r?: DerivedRecord; par?: number }[] = [
    ...records.map((r) => ({ tMs: Date.parse(r.t), r })),
    ...par.map(([tMs, v]) => ({ tMs, par: v })),
  ].sort((a, b) => a.tMs - b.tMs);
  const dailyOut: DailyRecord[] = [];
  const forecasts: ForecastRecord[] = [];
  const lastDepth = new Map<string, number>();
  let nextStep = -Infinity;
  for (const e of events) {
    if (e.tMs >= nextStep) {
      forecasts.push(...stepForecast(fs, plan, e.tMs, opts.forecast).records);
      nextStep = Math.floor(e.tMs / (cadenceMin * 60_000) + 1) * cadenceMin * 60_000;
    }
    if (e.par !== undefined) {
      observePar(fs, e.tMs, e.par);
      continue;
    }
    const r = e.r!;
    if (r.type === 'oxygen' && num(r, 'o2_mg_l') != null)
      observeOxygen(fs, r.station, e.tMs, num(r, 'o2_mg_l')!);
    else if (r.type === 'waves' && num(r, 'depth_m') != null) {
      observeDepth(fs, r.station, e.tMs, num(r, 'depth_m')!);
      lastDepth.set(r.station, num(r, 'depth_m')!);
      if (r.station === plan.offshoreStation && num(r, 'hm0_m') != null)
        observeOffshoreWaves(fs, e.tMs, num(r, 'hm0_m')!);
    } else if (r.type === 'current' && num(r, 'east_m_s') != null) {
      for (const t of plan.transects.filter((x) => x.current === r.station)) {
        const b = (t.bearingDeg * Math.PI) / 180;
        const u = num(r, 'east_m_s')! * Math.sin(b) + num(r, 'north_m_s')! * Math.cos(b);
        const d = num(r, 'depth_m') ?? lastDepth.get(r.station);
        if (d !== undefined) observeCurrent(fs, t.id, e.tMs, u, d);
      }
    } else if (r.type === 'flux') {
      const st = daily[r.transect]!;
      addWindow(st, {
        tMs: e.tMs,
        valid: r.valid,
        ncpMmolM2H: r.ncp_mmol_m2_h,
        ncpSigmaMmolM2H: num(r, 'ncp_sigma_mmol_m2_h') ?? null,
        necMmolM2H: r.nec_mmol_m2_h,
        necSigmaMmolM2H: num(r, 'nec_sigma_mmol_m2_h') ?? null,
        parUmolM2S: parMean(e.tMs),
      });
      const done = closeDueDays(st, cal, e.tMs + cadenceMin * 60_000, {
        cadenceMin,
        windowMin: config.processing.window_min,
        sun: { latDeg: plan.latDeg, lonDeg: plan.lonDeg },
      });
      for (const d of done) {
        const rec = toDailyRecord(config.site, r.transect, d);
        dailyOut.push(rec);
        const rh = rec.r_mmol_m2_h as number | null;
        const rs = rec.r_mmol_m2_h_sigma as number | null;
        if (rec.r_source === 'night_mean' && rh !== null && rs !== null)
          observeRespiration(fs, r.transect, d.bounds.startMs, rh, rs);
      }
    }
  }
  const byStation = new Map<string, { tMs: number; v: number }[]>();
  for (const t of truth) {
    const rows = byStation.get(t.station) ?? [];
    rows.push({ tMs: Date.parse(t.t), v: t.o2_mg_l });
    byStation.set(t.station, rows);
  }
  const scored: ScoredForecast[] = [];
  for (const f of forecasts) {
    const issue = Date.parse(f.t);
    const sunrise = Date.parse(f.sunrise);
    const rows = (byStation.get(f.station) ?? []).filter((x) => x.tMs >= issue && x.tMs <= sunrise);
    if (rows.length < 3) continue;
    scored.push({
      station: f.station,
      model: f.model,
      issueMs: issue,
      sunriseMs: sunrise,
      lead: f.lead_h,
      central: f.o2_min_mg_l,
      lo: f.o2_min_lo_mg_l,
      hi: f.o2_min_hi_mg_l,
      truthMin: Math.min(...rows.map((x) => x.v)),
      persistence: rows[0]!.v,
    });
  }
  // Checkpoint size of the two libraries' state at the end (plain JSON).
  const stateBytes = JSON.stringify(fs).length + JSON.stringify(daily).length;
  return { scored, daily: dailyOut, forecasts, stateBytes };
}
