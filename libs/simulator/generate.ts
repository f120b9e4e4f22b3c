// The simulator's public generator: reef state + time -> sensor messages (contract section 1) and the truth
// they were built from. Pure: the same config, start, duration and seed give the same sequence.
import type { Kind, ReefdConfig, SensorConfig } from '../contract/index.js';
import type { AdcpSetup } from './adcp.js';
import { drawCalibration } from './calibration-errors.js';
import {
  failingBatteryV,
  healthyBatteryV,
  planFaults,
  WHOLE_SITE,
  type ScriptedFault,
  type SensorRef,
} from './faults.js';
import { ReefModel, type ReefSnapshot, type WaveClimateOverride } from './model.js';
import { DailyTruthAccumulator } from './daily-truth.js';
import { buildMessage, isoTime as iso, round as r, type SensorRun, type SimMessage } from './messages.js';
import { applySensorError, type SensorError } from './sensor-errors.js';
import { createRng, type Rng } from './prng.js';
import { solarHour } from './signals.js';
import { siteLayout, type Role } from './site.js';
import { stationTruth, transectTruth, type TruthRow } from './truth.js';

export type { SimMessage } from './messages.js';

export interface SimulateOptions {
  startMs: number;
  durationMs: number;
  seed: number;
  /** Fix the offshore wave climate (tests); default: slowly varying Hrms 0.5-2 m. */
  waves?: WaveClimateOverride;
  /** Truth cadence, ms (default 10 min). */
  truthEveryMs?: number;
  /** Turn the scripted faults and the low-oxygen night off (clean data for physics tests). */
  faults?: boolean;
  /** IANA zone of the local days of the `daily` truth (default: the configuration's `timezone`, else UTC). */
  timeZone?: string;
  /**
   * Seed of the sensors' noise, timing offsets and calibration errors (default `seed`): runs with one `seed` and
   * different noise seeds are replicates of one reef.
   */
  noiseSeed?: number;
  /** Give each sensor a calibration error drawn from the typical accuracies (calibration-errors.ts). */
  calibrationErrors?: boolean;
  /** Calibration errors of some sensors, by `station/sensor` (sensor-errors.ts); the truth stays true. */
  sensorErrors?: Readonly<Record<string, SensorError>>;
}

export type SimEvent = { type: 'message'; message: SimMessage } | { type: 'truth'; row: TruthRow };

/** Reporting interval of each kind of the contract, s (pressure: one burst per interval). */
export const CADENCE_S: Readonly<Record<Kind, number>> = Object.freeze({
  ctd: 300,
  oxygen: 300,
  pco2: 600,
  pressure: 1800,
  adcp: 600,
  par: 300,
  met: 300,
  sample: 6 * 3600,
});

const STEP_S = 60;
const FAULT_CYCLE_MS = 48 * 3_600_000;
/** The first local solar 03:00 at least 12 h into the run, if the run reaches 3 h past it. */
function lagoonEventCentre(startMs: number, durationMs: number, lonDeg: number): number | undefined {
  const from = startMs + 12 * 3.6e6;
  const hour = solarHour(from, lonDeg);
  const centre = from + ((3 - hour + 24) % 24) * 3.6e6;
  return centre + 3 * 3.6e6 <= startMs + durationMs ? centre : undefined;
}

type Layout = ReturnType<typeof siteLayout>;

/** The ADCP's head and profile of one sensor: deeper stations get more and longer bins. */
function adcpSetupOf(sc: Extract<SensorConfig, { kind: 'adcp' }>, role: Role, rng: Rng): AdcpSetup {
  const deep = role === 'channel' || role === 'fore';
  return {
    heightM: sc.height_m,
    beamAngleDeg: sc.beam_angle_deg,
    convex: sc.head === 'convex',
    declinationDeg: sc.declination_deg + sc.heading_offset_deg,
    blankM: deep ? 0.2 : 0.1,
    binM: deep ? 0.25 : 0.1,
    bins: deep ? 34 : 24,
    compassHeadingDeg: 360 * rng.next(),
    pitchDeg: 1 + 3 * rng.next(),
    rollDeg: -3 + 6 * rng.next(),
  };
}

/** One run per enabled sensor, each with its own noise stream, start offset and (when asked) calibration error. */
function sensorRuns(config: ReefdConfig, layout: Layout, noiseRoot: Rng, opts: SimulateOptions): SensorRun[] {
  const sensors: SensorRun[] = [];
  for (const [station, st] of Object.entries(config.stations)) {
    const role = layout.roleOf.get(station) ?? 'flat';
    for (const [sensor, sc] of Object.entries(st.sensors)) {
      if (!sc.enabled) continue;
      const rng = noiseRoot.fork(`sensor/${station}/${sensor}`);
      const offsetMs = Math.floor(rng.next() * 50) * 1000;
      const run: SensorRun = {
        station,
        sensor,
        kind: sc.kind,
        role,
        config: sc,
        rng,
        nextMs: opts.startMs + offsetMs,
        seq: 0,
        frozen: undefined,
      };
      if (opts.calibrationErrors === true) run.cal = drawCalibration(sc.kind, rng.fork('calibration'));
      if (sc.kind === 'adcp') run.adcp = adcpSetupOf(sc, role, rng);
      sensors.push(run);
    }
  }
  return sensors;
}

/** The state of the send loop: the current cycle's scripted faults, the spikes sent, the outage backlog. */
interface SendState {
  readonly opts: SimulateOptions;
  readonly layout: Layout;
  faults: ScriptedFault[];
  readonly spiked: Set<ScriptedFault>;
  readonly backlog: Map<SimMessage, number>;
}

function faultOf(send: SendState, s: SensorRef, kind: ScriptedFault['fault'], tMs: number) {
  return send.faults.find(
    (f) =>
      (f.sensor === s.sensor || f.sensor === WHOLE_SITE) &&
      (f.station === s.station || f.station === WHOLE_SITE) &&
      f.fault === kind &&
      tMs >= f.startMs &&
      tMs < f.endMs + (kind === 'spike' ? CADENCE_S[s.kind as Kind] * 1000 : 0),
  );
}

/** Plans one fault cycle (and its low-oxygen night) and yields their truth rows. */
function* startCycle(
  send: SendState,
  sensors: SensorRun[],
  model: ReefModel,
  cycleMs: number,
): Generator<SimEvent> {
  const { opts, layout } = send;
  const lengthMs = Math.min(FAULT_CYCLE_MS, opts.startMs + opts.durationMs - cycleMs);
  send.faults = planFaults(sensors, cycleMs, lengthMs);
  for (const f of send.faults) yield { type: 'truth', row: { kind: 'fault', t: iso(f.startMs), ...f } };
  const centre = lagoonEventCentre(cycleMs, lengthMs, layout.lonDeg);
  if (centre !== undefined) {
    model.scheduleLagoonEvent(centre);
    yield {
      type: 'truth',
      row: { kind: 'event', t: iso(centre), event: 'lagoon_low_oxygen', centreMs: centre },
    };
  }
}

/** The station and transect truth rows of one snapshot. */
function* truthRows(snap: ReefSnapshot, config: ReefdConfig, layout: Layout): Generator<SimEvent> {
  for (const [station] of Object.entries(config.stations)) {
    const role = layout.roleOf.get(station) ?? 'flat';
    if (role !== 'mast') yield { type: 'truth', row: stationTruth(snap, station, role, layout.reefAxisDeg) };
  }
  for (const [id, tr] of Object.entries(config.transects)) {
    yield { type: 'truth', row: transectTruth(snap, id, tr, layout) };
  }
}

/** The scripted spike, flatline, battery and silent-uplink faults applied to one message. */
function applyFaults(send: SendState, s: SensorRun, snap: ReefSnapshot, msg: SimMessage, t: number): void {
  const spike = faultOf(send, s, 'spike', t);
  if (spike && !send.spiked.has(spike)) {
    send.spiked.add(spike);
    const key = s.kind === 'oxygen' ? firstO2Field(msg.payload) : 'temp_c';
    msg.payload[key] = r((msg.payload[key] as number) + (spike.spikeOffset ?? 0), 3);
  }
  if (s.kind === 'pco2') {
    if (faultOf(send, s, 'flatline', t)) {
      s.frozen ??= msg.payload.pco2_uatm as number;
      msg.payload.pco2_uatm = s.frozen;
    } else s.frozen = undefined;
  }
  const battery = faultOf(send, s, 'battery', t);
  msg.payload.battery_v = r(
    battery ? failingBatteryV(t, battery, s.rng.normal()) : healthyBatteryV(snap.parUmolM2S, s.rng.normal()),
    2,
  );
  // Silent uplink: the sample is kept by its logger and sent with the backlog when the link returns.
  const outage = faultOf(send, s, 'silent', msg.tMs);
  if (outage) {
    send.backlog.set(msg, msg.tMs);
    msg.tMs = outage.endMs;
  }
}

/** The message of sensor s's sample at t, with its calibration error and faults; none while it is stale. */
function sampleSensor(send: SendState, s: SensorRun, snap: ReefSnapshot, t: number): SimMessage | undefined {
  const { opts, layout } = send;
  if (faultOf(send, s, 'stale', t)) return undefined;
  const msg = buildMessage(s, snap, t, layout.site, layout.prefix);
  if (msg === undefined) return undefined;
  const error = opts.sensorErrors?.[`${s.station}/${s.sensor}`];
  if (error !== undefined)
    applySensorError(error, `${s.station}/${s.sensor}`, s.config.kind, msg.payload, t, opts.startMs);
  applyFaults(send, s, snap, msg, t);
  return msg;
}

/** Sends the pending messages due before stepEnd, the backlog of an outage in the order it was taken. */
function* sendDue(
  pending: SimMessage[],
  backlog: Map<SimMessage, number>,
  stepEnd: number,
): Generator<SimEvent> {
  pending.sort((a, b) => a.tMs - b.tMs || (backlog.get(a) ?? a.tMs) - (backlog.get(b) ?? b.tMs));
  while (pending.length > 0 && (pending[0] as SimMessage).tMs < stepEnd) {
    const m = pending.shift() as SimMessage;
    backlog.delete(m);
    yield { type: 'message', message: m };
  }
}

/** Lazily generates the run in send-time order, interleaving truth rows. */
export function* simulate(config: ReefdConfig, opts: SimulateOptions): Generator<SimEvent> {
  const layout = siteLayout(config);
  const root = createRng(opts.seed);
  const noiseRoot = opts.noiseSeed === undefined ? root : createRng(opts.noiseSeed);
  const withFaults = opts.faults ?? true;

  const model = new ReefModel(layout, root.fork('model'), {
    startMs: opts.startMs,
    stepS: STEP_S,
    taS35UmolKg: config.alkalinity.ta_s35_umol_kg,
    ...(opts.waves ? { waves: opts.waves } : {}),
  });
  const sensors = sensorRuns(config, layout, noiseRoot, opts);
  // Faults and the low-oxygen night are scripted per 48-h cycle, so a long live run shows them every two days.
  const send: SendState = { opts, layout, faults: [], spiked: new Set(), backlog: new Map() };
  let nextCycleMs = opts.startMs;
  const pending: SimMessage[] = [];
  const truthEvery = opts.truthEveryMs ?? 600_000;
  let nextTruth = opts.startMs;
  const endMs = opts.startMs + opts.durationMs;
  const daily = new DailyTruthAccumulator(config.transects, layout, opts.timeZone ?? config.timezone, STEP_S);
  for (let tMs = opts.startMs; tMs < endMs; tMs += STEP_S * 1000) {
    if (withFaults && tMs >= nextCycleMs) {
      yield* startCycle(send, sensors, model, nextCycleMs);
      nextCycleMs += FAULT_CYCLE_MS;
    }
    const snap = model.step();
    for (const row of daily.add(snap)) yield { type: 'truth', row };
    if (tMs >= nextTruth) {
      yield* truthRows(snap, config, layout);
      nextTruth += truthEvery;
    }
    const stepEnd = tMs + STEP_S * 1000;
    for (const s of sensors) {
      const cadenceMs = CADENCE_S[s.config.kind] * 1000;
      while (s.nextMs < stepEnd && s.nextMs < endMs) {
        const t = s.nextMs;
        s.nextMs += cadenceMs;
        const msg = sampleSensor(send, s, snap, t);
        if (msg !== undefined) pending.push(msg);
      }
    }
    yield* sendDue(pending, send.backlog, stepEnd);
  }
  for (const m of pending) if (m.tMs <= endMs) yield { type: 'message', message: m };
  for (const row of daily.finish(endMs)) yield { type: 'truth', row };
}

function firstO2Field(p: Record<string, unknown>): string {
  return p.o2_umol_l !== undefined ? 'o2_umol_l' : p.o2_mg_l !== undefined ? 'o2_mg_l' : 'o2_sat_pct';
}

/** Whole run in memory: the messages in send order and the truth rows (tests, replay fixtures). */
export function simulateMessages(
  config: ReefdConfig,
  opts: SimulateOptions,
): { messages: SimMessage[]; truth: TruthRow[] } {
  const messages: SimMessage[] = [];
  const truth: TruthRow[] = [];
  for (const ev of simulate(config, opts)) {
    if (ev.type === 'message') messages.push(ev.message);
    else truth.push(ev.row);
  }
  return { messages, truth };
}

export type { Role };
