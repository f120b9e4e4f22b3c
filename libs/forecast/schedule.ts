// The night schedule (docs/methods/forecast.md 11.7): at dusk (the sun's centre passing -0.833 deg, or the
// site's PAR going dark near that time) and every hour until sunrise a forecast is issued for every oxygen
// station; at sunrise each forecast of the night is scored against the observed minimum. Driven by event
// time only: the processor calls stepForecast with its watermark.
import { nextSunrise, sunEvents } from '../daily/index.js';
import { blockMeans } from './blocks.js';
import { issueAt, type CalibratedForecast, type IssueOptions } from './issue.js';
import type { ForecastPlan } from './plan.js';
import { toForecastRecord, type ForecastRecord } from './record.js';
import { refitModels, type RefitOptions } from './refit.js';
import { pruneState, type ForecastState } from './state.js';

export interface ForecastOptions extends IssueOptions, RefitOptions {
  /** Hours between issues after dusk (default 1). */
  issueEveryH: number;
  /** Nights of scored forecasts kept for the calibration (default 14). */
  calibrationNights: number;
  /** Days of O2, offshore and flow history kept (default 8). */
  historyDays: number;
  /** PAR below this is dark (default 1 umol m-2 s-1). */
  darkParUmolM2S: number;
}

export const DEFAULT_FORECAST_OPTIONS: Readonly<ForecastOptions> = Object.freeze({
  members: 128,
  defaultModelSigmaMgL: 0.25,
  minCalibration: 3,
  flowDays: 7,
  boxDays: 7,
  tideDays: 30,
  issueEveryH: 1,
  calibrationNights: 14,
  historyDays: 8,
  darkParUmolM2S: 1,
});

const HOUR = 3_600_000;
/** Scores and issued values are kept to 1e-4 mg/L in the state (checkpoints stay small). */
const r4 = (x: number) => Math.round(x * 1e4) / 1e4;

export interface StepResult {
  records: ForecastRecord[];
  /** Forecasts as computed (for tests and the bench), in issue order. */
  forecasts: CalibratedForecast[];
}

/** Dusk of the night after fromMs: the sunset, moved to where the site's PAR went dark within 90 minutes
 * of it when PAR was observed. Decided from the PAR blocks complete by watermarkMs only, so it is the same
 * whenever it is asked: while the site's PAR reports and shows no dusk yet, undefined until 90 minutes
 * after sunset. */
function nextDusk(
  s: ForecastState,
  plan: ForecastPlan,
  fromMs: number,
  watermarkMs: number,
  o: ForecastOptions,
): number | { waitFromMs: number } | undefined {
  const set = sunEvents(fromMs, fromMs + 36 * HOUR, plan.latDeg, plan.lonDeg).find((e) => e.kind === 'set');
  if (!set) return undefined;
  const until = set.tMs + 1.5 * HOUR;
  const par = blockMeans(s.par, set.tMs - 1.5 * HOUR, Math.min(until, watermarkMs));
  for (let i = 1; i < par.v.length; i++) {
    if ((par.v[i - 1] as number) >= o.darkParUmolM2S && (par.v[i] as number) < o.darkParUmolM2S)
      return (par.tMs[i] as number) - s.par.blockMs / 2; // the first dark block: the light went within it or just before
  }
  // The light may still go later: wait for the PAR of the whole span (a site without PAR uses the sun).
  if (s.par.k.length > 0 && watermarkMs < until) return { waitFromMs: Math.min(fromMs, set.tMs - 1) };
  return set.tMs;
}

/** Scores every forecast of the night against the minimum of the observed blocks from its issue to sunrise. */
function scoreNight(s: ForecastState, o: ForecastOptions): void {
  const night = s.night;
  if (!night) return;
  for (const st of night.anomalies) (s.anomalies[st] ??= []).push([night.duskMs, night.sunriseMs]);
  for (const f of night.issued) {
    // An anomalous night says nothing about the model's everyday error.
    if (night.anomalies.includes(f.station)) continue;
    const b = s.o2[f.station];
    if (!b) continue;
    const m = blockMeans(b, f.issueMs, f.sunriseMs + b.blockMs / 2);
    if (m.v.length < 2) continue;
    const rows = (s.errors[f.station] ??= []);
    rows.push({
      issueMs: f.issueMs,
      lead: f.lead,
      errMgL: r4(Math.min(...m.v) - f.rawMgL),
      halfLoMgL: r4(f.halfLoMgL),
      halfHiMgL: r4(f.halfHiMgL),
      ...(f.model !== undefined ? { model: f.model } : {}),
    });
    const keepFrom = f.issueMs - o.calibrationNights * 24 * HOUR;
    s.errors[f.station] = rows.filter((r) => r.issueMs >= keepFrom);
  }
}

/**
 * Runs the schedule up to watermarkMs: refits the models once a day, issues the forecasts that are due, scores
 * the night after sunrise. Returns the records of the forecasts issued. The first call only starts the clock.
 */
export function stepForecast(
  s: ForecastState,
  plan: ForecastPlan,
  watermarkMs: number,
  options: Partial<ForecastOptions> = {},
): StepResult {
  const o = { ...DEFAULT_FORECAST_OPTIONS, ...options };
  const out: StepResult = { records: [], forecasts: [] };
  if (!Number.isFinite(plan.latDeg) || !Number.isFinite(plan.lonDeg)) return out;
  if (s.lastStepMs === null) {
    s.lastStepMs = watermarkMs;
    return out;
  }
  let waitFromMs: number | undefined;
  for (;;) {
    if (s.night === null) {
      const dusk = nextDusk(s, plan, s.lastStepMs, watermarkMs, o);
      if (typeof dusk === 'object') waitFromMs = dusk.waitFromMs;
      if (dusk === undefined || typeof dusk === 'object' || dusk > watermarkMs) break;
      const sunrise = nextSunrise(dusk, plan.latDeg, plan.lonDeg);
      if (sunrise === undefined) break;
      s.night = { duskMs: dusk, sunriseMs: sunrise, nextIssueMs: dusk, issued: [], anomalies: [] };
    }
    const night = s.night;
    while (night.nextIssueMs <= watermarkMs && night.nextIssueMs < night.sunriseMs) {
      const T = night.nextIssueMs;
      if (s.fits === null || T - s.fits.fittedAtMs >= 24 * HOUR - 1) s.fits = refitModels(s, plan, T, o);
      const lead = Math.round((T - night.duskMs) / HOUR);
      for (const f of issueAt(s, plan, s.fits, T, night, lead, o)) {
        if (f.anomalous && !night.anomalies.includes(f.station)) night.anomalies.push(f.station);
        night.issued.push({
          station: f.station,
          issueMs: T,
          sunriseMs: night.sunriseMs,
          lead,
          rawMgL: r4(f.rawMgL),
          halfLoMgL: r4(f.halfLoMgL),
          halfHiMgL: r4(f.halfHiMgL),
          model: f.kind,
        });
        out.forecasts.push(f);
        out.records.push(toForecastRecord(plan.site, T, f, night.sunriseMs, lead));
      }
      night.nextIssueMs = T + o.issueEveryH * HOUR;
    }
    // Scored once the block holding sunrise is complete.
    if (night.sunriseMs + 15 * 60_000 <= watermarkMs) {
      scoreNight(s, o);
      s.lastStepMs = night.sunriseMs;
      s.night = null;
      continue;
    }
    break;
  }
  // No night open: nothing can be due before the watermark any more (but a dusk still being decided).
  if (s.night === null) s.lastStepMs = waitFromMs ?? watermarkMs;
  pruneState(s, watermarkMs, o);
  // Depth records of stations no model reads (the fore reef, a channel) are not kept.
  const needed = new Set([
    ...plan.stations.map((p) => p.station),
    ...plan.transects.flatMap((t) => [t.upstream, t.downstream, t.current]),
  ]);
  for (const k of Object.keys(s.depth)) if (!needed.has(k)) delete s.depth[k];
  return out;
}
