// What happens as the watermark moves: flux windows whose end it has passed (on the cadence grid), pruning of
// old samples, and the alert engine's stale check. Records emitted per window (not per message) start here.
import type { DerivedRecord, ReefdConfig } from '../contract/index.js';
import type { AlertEngine } from '../alerts/index.js';
import type { TransectParams } from '../metabolism/index.js';
import type { DayNight } from './day-night.js';
import { windowInputs, type FaultWiring } from './faults.js';
import type { FieldHooks } from './field.js';
import { markFluxRecord } from './field-marks.js';
import { transectFluxAt, transectParams, type FlaggedFluxRecord } from './flux.js';
import { alertRecord, type Observer } from './observe.js';
import { pruneBefore, type Series } from './series.js';
import type { ProcessorTimes } from './settings.js';
import type { ProcessorState, SiteVar, StationVar } from './state.js';
import { holdWindow, takeHeldWindows, waitsForCentred } from './storage-hold.js';

const MIN = 60_000;
const HOUR = 3_600_000;
/** After a silence longer than this, the grid resumes near the watermark instead of walking every tick. */
const MAX_TICK_WALK_MS = 48 * HOUR;

export interface Windows {
  /** Computes what the watermark's move makes due; records and alerts go to `out`. */
  advance(watermarkMs: number, out: DerivedRecord[]): void;
  /** Computes the windows still held for a centred storage term with what there is (end of a replay). */
  flush(out: DerivedRecord[]): void;
}

/**
 * Drops samples behind the horizons (station series, bottle samples, site series): memory stays bounded in
 * time, and nothing a derivation or a window may still read is dropped.
 */
function prune(state: ProcessorState, times: ProcessorTimes, watermarkMs: number): void {
  const cut = watermarkMs - times.horizonMs;
  const sampleCut = watermarkMs - times.sampleHorizonMs;
  for (const id in state.stations) {
    const st = state.stations[id] as Record<StationVar, Series>;
    for (const k in st) {
      const s = st[k as StationVar];
      const c = k.startsWith('sample') ? sampleCut : cut;
      if (s.t.length > 0 && (s.t[0] as number) < c) pruneBefore(s, c);
    }
  }
  const siteCut = watermarkMs - times.siteHorizonMs;
  for (const k in state.site) {
    const s = state.site[k as SiteVar];
    if (s.t.length > 0 && (s.t[0] as number) < siteCut) pruneBefore(s, siteCut);
  }
}

export function createWindows(
  config: ReefdConfig,
  state: ProcessorState,
  times: ProcessorTimes,
  alerts: AlertEngine,
  observer: Observer,
  faults: FaultWiring,
  field: FieldHooks,
  dayNight: DayNight,
): Windows {
  const params = new Map<string, TransectParams>(
    Object.entries(config.transects).map(([id, tr]) => [id, transectParams(config, tr)]),
  );
  // The sensors each transect's windows read, and the faults and failed samples among them over a span.
  const inputs = new Map(Object.entries(config.transects).map(([id, tr]) => [id, windowInputs(faults, tr)]));
  // A window on modelled flow does not read the current station's ADCP (forecast-step.ts).
  const withoutCurrent = new Map(
    Object.entries(config.transects).map(([id, tr]) => {
      const adcp = new Set([
        ...faults.writers({ station: tr.current, v: 'east' }),
        ...faults.writers({ station: tr.current, v: 'north' }),
      ]);
      return [id, (inputs.get(id) ?? []).filter((k) => !adcp.has(k))];
    }),
  );
  const inputReasons = (id: string, fromMs: number, toMs: number, modelled = false): string[] =>
    faults.reasonsDuring((modelled ? withoutCurrent : inputs).get(id) ?? [], fromMs, toMs);
  const hasTransects = params.size > 0;
  // Pruning walks every series of every station, so it runs when the watermark enters a new minute, not on
  // every message: the horizons are hours longer than anything a derivation reads, so when the old samples
  // go changes no record. (Not in the checkpoint: after a restart the first advance prunes.)
  let lastPruneStep = -1;

  const emit = (r: FlaggedFluxRecord | undefined, out: DerivedRecord[]): void => {
    if (r === undefined) return;
    // calibrated: true when an input had a correction in force over the window, the one before (storage) and,
    // for a centred storage term, the one after.
    const endMs = Date.parse(r.t) + times.windowMs / 2;
    const centred = typeof r.notes === 'string' && r.notes.split(',').includes('storage_centred');
    markFluxRecord(
      field,
      r,
      endMs - times.windowMs,
      centred ? endMs + times.windowMs : endMs,
      times.windowMs,
    );
    // The window's PAR, and the window into its transect's local day (daily-step.ts).
    dayNight.daily.onFlux(r);
    out.push(r);
    observer.record(r, undefined, Date.parse(r.t), r.flag, out);
  };
  const compute = (id: string, endMs: number, withNext: boolean) =>
    transectFluxAt(
      config,
      state,
      id,
      endMs,
      params.get(id) as TransectParams,
      inputReasons,
      withNext,
      dayNight.forecast.fallback(id),
    );
  /**
   * Centre of the earliest window not out yet: the next tick's, or a window held for its centred storage term.
   * The local days before it are complete.
   */
  const pendingCentreMs = (nextEndMs: number): number =>
    state.heldWindows.reduce((m, w) => Math.min(m, w.endMs), nextEndMs) - times.windowMs / 2;

  /**
   * The windows ending at endMs, after the held windows whose next window ends there (their centred storage
   * term can be computed now, and the inverse of the window a window later starts from their result).
   */
  function tick(endMs: number, out: DerivedRecord[]): void {
    if (!hasTransects) return;
    for (const w of takeHeldWindows(state, endMs - times.windowMs))
      emit(compute(w.transect, w.endMs, true), out);
    for (const id of params.keys()) {
      const r = compute(id, endMs, false);
      if (r !== undefined && waitsForCentred(r)) holdWindow(state, { transect: id, endMs });
      else emit(r, out);
    }
  }

  return {
    advance(watermarkMs, out) {
      // Faults first (a sensor gone silent is stale from its first missed message): the windows closing now
      // see every fault the watermark has revealed.
      faults.advance(watermarkMs);
      const cadence = times.cadenceMs;
      if (state.lastTickMs < 0) {
        // The cadence grid starts at the earliest message derived (not the first to arrive), so the windows
        // do not depend on the delivery order within the lateness.
        if (state.firstDerivedMs === undefined) return;
        state.lastTickMs = Math.floor(state.firstDerivedMs / cadence) * cadence;
      }
      let next = state.lastTickMs + cadence;
      if (watermarkMs - next > MAX_TICK_WALK_MS)
        next = Math.floor((watermarkMs - 2 * times.windowMs) / cadence) * cadence;
      for (; next + times.windowDelayMs <= watermarkMs; next += cadence) {
        tick(next, out);
        state.lastTickMs = next;
        // Days whose windows are all out close (the next window is centred at next + cadence - W/2), and
        // tonight's schedule runs to the tick's time: both on the cadence grid, so on event time only.
        dayNight.daily.close(pendingCentreMs(next + cadence), out);
        dayNight.forecast.step(next + times.windowDelayMs, out);
      }
      const pruneStep = Math.floor(watermarkMs / MIN);
      if (pruneStep !== lastPruneStep) {
        lastPruneStep = pruneStep;
        prune(state, times, watermarkMs);
      }
      for (const a of alerts.advance(watermarkMs)) out.push(alertRecord(a));
    },
    flush(out) {
      for (const w of takeHeldWindows(state, Infinity)) emit(compute(w.transect, w.endMs, true), out);
      if (state.lastTickMs >= 0)
        dayNight.daily.close(pendingCentreMs(state.lastTickMs + times.cadenceMs), out);
    },
  };
}
