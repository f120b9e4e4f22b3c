// Daily budgets in the processor (docs/methods/daily.md 10.4, 10.8): every flux window gets the PAR of its
// window (`par_umol_m2_s`, at the bed where the transect has an attenuation) and joins its transect's local
// day; a day closes into a `daily` record once every window centred in it has been computed. Its night
// respiration then feeds tonight's oxygen forecast. Event time only: live, replay and tests give the same days.
import type { DerivedRecord, ReefdConfig, TransectConfig } from '../contract/index.js';
import {
  addWindow,
  closeDueDays,
  createLocalCalendar,
  toDailyRecord,
  type DailyOptions,
  type LocalCalendar,
} from '../daily/index.js';
import { observeRespiration, type ForecastPlan } from '../forecast/index.js';
import { windowMean } from '../metabolism/index.js';
import type { FlaggedFluxRecord } from './flux.js';
import { meanParUmolM2S, windowParUmolM2S } from './light.js';
import type { Observer } from './observe.js';
import { medianIntervalMs, type Series } from './series.js';
import { dailyOf, type ProcessorState } from './state.js';

const MIN = 60_000;

export interface DailyStep {
  /** Adds the window's PAR to a flux record and the window to its transect's day (before it goes out). */
  onFlux(rec: FlaggedFluxRecord): void;
  /**
   * Closes the local days of every transect whose windows are all out: `finalBeforeMs` is the centre of the
   * earliest window not computed yet. Their `daily` records (and alerts on them) go to `out`.
   */
  close(finalBeforeMs: number, out: DerivedRecord[]): void;
}

/** Mean of a series' usable samples over [start, end), or undefined (fewer than half of those expected). */
function seriesMean(s: Series | undefined, startMs: number, endMs: number): number | undefined {
  if (s === undefined || s.t.length === 0) return undefined;
  const interval = medianIntervalMs(s, 15, endMs);
  const expected =
    interval !== undefined && interval > 0 ? Math.max(1, Math.floor((endMs - startMs) / interval)) : 1;
  const m = windowMean(s.t, s.v, s.f, startMs, endMs, expected).mean;
  return m === null ? undefined : m;
}

/** The mean of a variable over the window at the transect's two stations (one when the other has none). */
function pairMean(
  state: ProcessorState,
  tr: TransectConfig,
  v: 'depth' | 'omega',
  startMs: number,
  endMs: number,
): number | undefined {
  const xs = [tr.upstream, tr.downstream]
    .map((id) => seriesMean(state.stations[id]?.[v], startMs, endMs))
    .filter((x): x is number => x !== undefined);
  return xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : undefined;
}

export function createDailyStep(
  config: ReefdConfig,
  state: ProcessorState,
  plan: ForecastPlan,
  observer: Observer,
): DailyStep {
  const calendar: LocalCalendar = createLocalCalendar(config.timezone);
  const W = config.processing.window_min * MIN;
  const options: DailyOptions = {
    cadenceMin: config.processing.cadence_min,
    windowMin: config.processing.window_min,
    ...(Number.isFinite(plan.latDeg) && Number.isFinite(plan.lonDeg)
      ? { sun: { latDeg: plan.latDeg, lonDeg: plan.lonDeg } }
      : {}),
  };

  return {
    onFlux(rec) {
      const tr = config.transects[rec.transect];
      if (tr === undefined) return;
      const centre = Date.parse(rec.t);
      const [startMs, endMs] = [centre - W / 2, centre + W / 2];
      const depth = rec.depth_m ?? pairMean(state, tr, 'depth', startMs, endMs);
      const par = windowParUmolM2S(tr, meanParUmolM2S(state.site.par, startMs, endMs), depth);
      rec.par_umol_m2_s = par;
      const omega = pairMean(state, tr, 'omega', startMs, endMs);
      const ext = rec as unknown as Record<string, number | null | undefined>;
      addWindow(dailyOf(state, rec.transect), {
        tMs: centre,
        valid: rec.valid,
        ncpMmolM2H: rec.ncp_mmol_m2_h,
        ncpSigmaMmolM2H: ext.ncp_sigma_mmol_m2_h ?? null,
        necMmolM2H: rec.nec_mmol_m2_h,
        necSigmaMmolM2H: ext.nec_sigma_mmol_m2_h ?? null,
        parUmolM2S: par,
        ...(omega !== undefined ? { omegaAr: omega } : {}),
      });
    },
    close(finalBeforeMs, out) {
      // The configuration's transects only (a re-derivation's core holds the other transects' days too).
      for (const id of Object.keys(config.transects)) {
        const daily = state.daily[id];
        if (daily === undefined) continue;
        for (const day of closeDueDays(daily, calendar, finalBeforeMs, options)) {
          const rec = toDailyRecord(config.site, id, day);
          out.push(rec as unknown as DerivedRecord);
          observer.record(
            rec as unknown as DerivedRecord,
            undefined,
            day.bounds.startMs,
            rec.valid ? 1 : 3,
            out,
          );
          // Tonight's forecast reads the transect's night respiration from its recent days (forecast.md 11.5).
          if (rec.r_source === 'night_mean' && day.rHourly.value !== null && day.rHourly.sigma !== null)
            observeRespiration(state.forecast, id, day.bounds.startMs, day.rHourly.value, day.rHourly.sigma);
        }
      }
    },
  };
}
