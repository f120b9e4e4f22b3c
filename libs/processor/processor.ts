// The processor: a deterministic state machine on event time, (state, message) -> (state, records).
// The same code runs live, in replay and in tests; only the order of messages matters, never the clock.
// Everything per sensor kind is in kinds/ (one module per kind); this file wires intake, the hold, the
// derivation and the windows.
import type { DerivedRecord, ReefdConfig, SensorMessage } from '../contract/index.js';
import { createAlertEngine, type AlertEngine, type EngineSnapshot } from '../alerts/index.js';
import { planFromConfig } from '../forecast/index.js';
import { createDayNight, type DayNightOptions } from './day-night.js';
import { makeContext } from './derive.js';
import { deriveMessage } from './dispatch.js';
import { createFaultWiring, exclusionsOf, type FaultWiring } from './faults.js';
import { createFieldHooks, type FieldHooks, type ProcessorOptions } from './field.js';
import { kindModules } from './kinds/index.js';
import { alertRecord, createObserver, type Observer } from './observe.js';
import { completeMs, hold, sortHeld, takeDue } from './order.js';
import { intake, sensorHealth, type SensorHealthRow } from './sensors.js';
import { processorTimes } from './settings.js';
import { completeState, createState, STATE_VERSION, type ProcessorState } from './state.js';
import { withRevisions } from './revise.js';
import { reviseScope } from './scope.js';
import { createWindows } from './windows.js';

/** A sample stamped more than this after its receive time comes from a wrong clock (QARTOD timing test). */
export const MAX_CLOCK_LEAD_MS = 60_000;

export type PushStatus = 'ok' | 'duplicate' | 'clock_fault' | 'disabled';

export interface PushResult {
  status: PushStatus;
  records: DerivedRecord[];
  /** The message arrived after the watermark had passed its time. */
  late: boolean;
  /** The sensor's `seq` started again on this message (a logger reboot); the message is kept. */
  seqRestart?: boolean;
}

export interface Processor {
  /** Feeds one validated message (see checkAgainstConfig) received at rxMs. */
  push(message: SensorMessage, rxMs: number): PushResult;
  /** Computes every window whose end the data has passed, ignoring the lateness (end of a replay). */
  drain(): DerivedRecord[];
  /**
   * The whole state as plain JSON data (the checkpoint): a copy, or with `copy: false` the live state itself,
   * for a caller that serialises it before the next push and keeps nothing of it (the daemon's checkpoint
   * writes it in pieces between two pushes instead of cloning it first). An implementation may return a
   * copy either way.
   */
  snapshot(options?: { copy?: boolean }): ProcessorState;
  /** Event-time watermark, ms (0 before the first message). */
  watermarkMs(): number;
  counters(): ProcessorState['counters'];
  /** Alerts raised and not yet cleared. */
  activeAlerts(): DerivedRecord[];
  /** Last seen, battery and last flag of every sensor that has reported. */
  sensorHealth(): SensorHealthRow[];
}

export type { SensorHealthRow };

export type { ProcessorOptions };

/** The state to start from: a checkpoint of this version, or a cold start (STATE_VERSION in state.ts). */
function startState(config: ReefdConfig, restored: ProcessorState | undefined): ProcessorState {
  const stationIds = Object.keys(config.stations);
  const state =
    restored !== undefined && restored.version === STATE_VERSION
      ? structuredClone(restored)
      : createState(stationIds);
  completeState(state, stationIds);
  return state;
}

function startAlerts(config: ReefdConfig, state: ProcessorState): AlertEngine {
  const alerts = createAlertEngine(config.alerts, config.site);
  if (state.alerts !== undefined && state.alerts !== null) {
    try {
      alerts.restore(state.alerts as EngineSnapshot);
    } catch {
      // A snapshot of another site or version: start the alert state fresh (episodes re-evaluate on data).
    }
  }
  return alerts;
}

/**
 * The intake rules before a message is accepted: a disabled sensor, a clock running ahead, a duplicate.
 * Returns the status of a refused message (counted; a clock fault feeds the alert engine), `reboot` for an
 * accepted message on which the sensor's seq started again, or undefined.
 */
function screen(
  config: ReefdConfig,
  state: ProcessorState,
  observer: Observer,
  m: SensorMessage,
  rxMs: number,
  out: DerivedRecord[],
): Exclude<PushStatus, 'ok'> | 'reboot' | undefined {
  if (config.stations[m.station]?.sensors[m.sensor]?.enabled === false) {
    state.counters.disabledSensor++;
    return 'disabled';
  }
  if (m.tMs - rxMs > MAX_CLOCK_LEAD_MS) {
    // A sensor clock running ahead would drag the watermark into the future and close every window.
    state.counters.clockFaults++;
    observer.alert(m, `${m.kind}.clock`, Number.NaN, 4, out);
    return 'clock_fault';
  }
  const seen = intake(state, m);
  if (seen === 'duplicate') {
    state.counters.duplicates++;
    return 'duplicate';
  }
  if (seen === 'reboot') {
    state.counters.sensorReboots = (state.counters.sensorReboots ?? 0) + 1;
    return 'reboot';
  }
  return undefined;
}

/**
 * The fault wiring, with the field logbook's exclusions as faults, and the derive context whose lookups skip
 * faulty optional inputs (faults.ts).
 */
function startFaults(
  config: ReefdConfig,
  state: ProcessorState,
  alerts: AlertEngine,
  options: ProcessorOptions,
  field: FieldHooks,
) {
  const faults: FaultWiring = createFaultWiring(config, state, alerts.rules);
  for (const x of [...exclusionsOf(options.logbook ?? []), ...(options.exclusions ?? [])]) faults.exclude(x);
  const ctx = makeContext(
    config,
    state,
    field,
    (ref, tMs) => faults.faultsAt(faults.writers(ref), tMs).length === 0,
  );
  return { faults, ctx };
}

/**
 * The processor of a site. `options` brings the deployment's calibration file and field logbook (read by the
 * services) and the reach of the live re-derivation of late lab results (revise.ts).
 */
export function createProcessor(
  config: ReefdConfig,
  restored?: ProcessorState,
  options: ProcessorOptions = {},
): Processor {
  const field = createFieldHooks(config, options, kindModules);
  const core = createCore(config, restored, options, field);
  const scope = reviseScope(config, kindModules);
  if (scope === undefined) return withRevisions(config, core, options, undefined);
  const scopeField = createFieldHooks(scope.config, options, kindModules);
  // A scratch core follows the site's forecast plan (its flow model fits are those of the live run) and sends
  // no forecasts: they read the whole site, and lab results do not change them.
  const scratchNights: DayNightOptions = { plan: planFromConfig(config), scratch: true };
  return withRevisions(config, core, options, {
    scope,
    scratch: (from) => createCore(scope.config, from, options, scopeField, scratchNights),
  });
}

/** The processor without the re-derivation layer, and its live state (revise.ts runs scratch cores). */
export interface Core extends Processor {
  readonly state: ProcessorState;
  /**
   * The clock of an accepted message that is not derived here (a re-derivation's scratch core replays the
   * messages of its scope, and only the times of the others): the hold and the windows move as they did.
   */
  advanceTo(eventMs: number): DerivedRecord[];
}

export function createCore(
  config: ReefdConfig,
  restored: ProcessorState | undefined,
  options: ProcessorOptions,
  field: FieldHooks,
  nights: DayNightOptions = {},
): Core {
  const state = startState(config, restored);
  sortHeld(state);
  const alerts = startAlerts(config, state);
  const times = processorTimes(config);
  const { faults, ctx } = startFaults(config, state, alerts, options, field);
  const observer = createObserver(state, alerts, faults);
  const dayNight = createDayNight(config, state, observer, nights);
  const windows = createWindows(config, state, times, alerts, observer, faults, field, dayNight);

  const count = (records: readonly DerivedRecord[]): void => {
    for (const r of records) state.counters.records[r.type] = (state.counters.records[r.type] ?? 0) + 1;
  };
  const watermark = () => (state.maxEventMs > 0 ? state.maxEventMs - times.latenessMs : 0);
  /** Derives one message; its records also feed tonight's forecast (forecast-step.ts). */
  const derive = (m: SensorMessage, rxMs: number, out: DerivedRecord[]): void => {
    const from = out.length;
    deriveMessage(ctx, observer, faults, m, rxMs, out);
    dayNight.forecast.observe(out, from);
  };
  /**
   * Derives the held messages up to untilMs in event-time order, the watermark's effects interleaved: before
   * a message at or behind the watermark, everything the watermark makes due up to the message's time (stale
   * faults, flux windows, days, forecasts, stale alerts) is done first. So a message sees the same state, and
   * a window the same derived messages, however many messages one delivery releases at once.
   */
  const release = (untilMs: number, out: DerivedRecord[]): void => {
    for (const h of takeDue(state, untilMs)) {
      const eMs = completeMs(h.message);
      if (eMs <= watermark()) windows.advance(eMs, out);
      derive(h.message, h.rxMs, out);
    }
  };

  /** A message past the intake rules: derived now if late, else held; then the hold and the windows move. */
  function accept(m: SensorMessage, rxMs: number, out: DerivedRecord[]): boolean {
    state.counters.accepted++;
    const eMs = completeMs(m);
    const late = eMs < watermark();
    if (eMs > state.maxEventMs) state.maxEventMs = eMs;
    if (late) {
      // Past the watermark: its windows are closed; derived now, counted late (QC judges its order).
      state.counters.late++;
      derive(m, rxMs, out);
    } else {
      // Held in event-time order for reorder_min, then derived (reorder_min 0: at once); with
      // reorder_min = lateness_min the records do not depend on the delivery order at all.
      hold(state, m, rxMs);
    }
    release(state.maxEventMs - times.reorderMs, out);
    windows.advance(watermark(), out);
    return late;
  }

  return {
    state,
    push(m, rxMs) {
      const out: DerivedRecord[] = [];
      const refused = screen(config, state, observer, m, rxMs, out);
      if (refused !== undefined && refused !== 'reboot')
        return { status: refused, records: out, late: false };
      const late = accept(m, rxMs, out);
      count(out);
      return refused === 'reboot'
        ? { status: 'ok', records: out, late, seqRestart: true }
        : { status: 'ok', records: out, late };
    },
    advanceTo(eventMs) {
      const out: DerivedRecord[] = [];
      if (eventMs > state.maxEventMs) state.maxEventMs = eventMs;
      release(state.maxEventMs - times.reorderMs, out);
      windows.advance(watermark(), out);
      return out;
    },
    drain() {
      const out: DerivedRecord[] = [];
      release(Infinity, out);
      if (state.maxEventMs > 0) windows.advance(state.maxEventMs, out);
      windows.flush(out);
      count(out);
      return out;
    },
    snapshot(o) {
      if (o?.copy === false) {
        state.alerts = alerts.snapshot(o);
        return state;
      }
      state.alerts = alerts.snapshot();
      return structuredClone(state);
    },
    watermarkMs: watermark,
    counters: () => structuredClone(state.counters),
    activeAlerts: () => alerts.active().map(alertRecord),
    sensorHealth: () => sensorHealth(config, state),
  };
}
