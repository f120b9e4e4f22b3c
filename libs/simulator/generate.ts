// The simulator's public generator: reef state + time -> sensor messages (contract section 1) and the truth
// they were built from. Pure: the same config, start, duration and seed give the same sequence.
import type { Kind, ReefdConfig, SensorConfig } from '../contract/index.js';
import { adcpEnsemble, type AdcpSetup } from './adcp.js';
import { synthesizeBurst } from './burst.js';
import { drawCalibration, measuredCurrent, type SensorCalibration } from './calibration-errors.js';
import { density, o2MgL, speciate } from './chemistry.js';
import {
  failingBatteryV,
  healthyBatteryV,
  planFaults,
  WHOLE_SITE,
  type ScriptedFault,
  type SensorRef,
} from './faults.js';
import { ReefModel, type ReefSnapshot, type WaveClimateOverride } from './model.js';
import { optodeSalinityFactor } from './optode.js';
import { DailyTruthAccumulator } from './daily-truth.js';
import { applySensorError, type SensorError } from './sensor-errors.js';
import { createRng, type Rng } from './prng.js';
import { solarHour } from './signals.js';
import { siteLayout, type Role } from './site.js';
import { stationTruth, transectTruth, type TruthRow } from './truth.js';

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

export interface SimMessage {
  topic: string;
  payload: Record<string, unknown>;
  /** When the sensor sends it (ms): the sample time, or the end of a pressure burst. */
  tMs: number;
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
const r = (x: number, dp: number) => Math.round(x * 10 ** dp) / 10 ** dp;
const iso = (ms: number) => new Date(ms).toISOString();

interface SensorRun extends SensorRef {
  config: SensorConfig;
  rng: Rng;
  nextMs: number;
  seq: number;
  adcp?: AdcpSetup;
  frozen: number | undefined;
  /** Calibration errors (absent: a perfect sensor). */
  cal?: SensorCalibration;
}

/** The first local solar 03:00 at least 12 h into the run, if the run reaches 3 h past it. */
function lagoonEventCentre(startMs: number, durationMs: number, lonDeg: number): number | undefined {
  const from = startMs + 12 * 3.6e6;
  const hour = solarHour(from, lonDeg);
  const centre = from + ((3 - hour + 24) % 24) * 3.6e6;
  return centre + 3 * 3.6e6 <= startMs + durationMs ? centre : undefined;
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
      if (sc.kind === 'adcp') {
        const deep = role === 'channel' || role === 'fore';
        run.adcp = {
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
      sensors.push(run);
    }
  }
  // Faults and the low-oxygen night are scripted per 48-h cycle, so a long live run shows them every two days.
  let faults: ScriptedFault[] = [];
  const faultOf = (s: SensorRef, kind: ScriptedFault['fault'], tMs: number) =>
    faults.find(
      (f) =>
        (f.sensor === s.sensor || f.sensor === WHOLE_SITE) &&
        (f.station === s.station || f.station === WHOLE_SITE) &&
        f.fault === kind &&
        tMs >= f.startMs &&
        tMs < f.endMs + (kind === 'spike' ? CADENCE_S[s.kind as Kind] * 1000 : 0),
    );
  let nextCycleMs = opts.startMs;
  function* startCycle(cycleMs: number): Generator<SimEvent> {
    const lengthMs = Math.min(FAULT_CYCLE_MS, opts.startMs + opts.durationMs - cycleMs);
    faults = planFaults(sensors, cycleMs, lengthMs);
    for (const f of faults) yield { type: 'truth', row: { kind: 'fault', t: iso(f.startMs), ...f } };
    const centre = lagoonEventCentre(cycleMs, lengthMs, layout.lonDeg);
    if (centre !== undefined) {
      model.scheduleLagoonEvent(centre);
      yield {
        type: 'truth',
        row: { kind: 'event', t: iso(centre), event: 'lagoon_low_oxygen', centreMs: centre },
      };
    }
  }

  const pending: SimMessage[] = [];
  const truthEvery = opts.truthEveryMs ?? 600_000;
  let nextTruth = opts.startMs;
  const endMs = opts.startMs + opts.durationMs;
  const spiked = new Set<ScriptedFault>();
  const backlog = new Map<SimMessage, number>();
  const daily = new DailyTruthAccumulator(config.transects, layout, opts.timeZone ?? config.timezone, STEP_S);
  for (let tMs = opts.startMs; tMs < endMs; tMs += STEP_S * 1000) {
    if (withFaults && tMs >= nextCycleMs) {
      yield* startCycle(nextCycleMs);
      nextCycleMs += FAULT_CYCLE_MS;
    }
    const snap = model.step();
    for (const row of daily.add(snap)) yield { type: 'truth', row };
    if (tMs >= nextTruth) {
      for (const [station] of Object.entries(config.stations)) {
        const role = layout.roleOf.get(station) ?? 'flat';
        if (role !== 'mast')
          yield { type: 'truth', row: stationTruth(snap, station, role, layout.reefAxisDeg) };
      }
      for (const [id, tr] of Object.entries(config.transects)) {
        yield { type: 'truth', row: transectTruth(snap, id, tr, layout) };
      }
      nextTruth += truthEvery;
    }
    const stepEnd = tMs + STEP_S * 1000;
    for (const s of sensors) {
      const cadenceMs = CADENCE_S[s.config.kind] * 1000;
      while (s.nextMs < stepEnd && s.nextMs < endMs) {
        const t = s.nextMs;
        s.nextMs += cadenceMs;
        if (faultOf(s, 'stale', t)) continue;
        const msg = buildMessage(s, snap, t, layout.site, layout.prefix);
        if (msg === undefined) continue;
        const error = opts.sensorErrors?.[`${s.station}/${s.sensor}`];
        if (error !== undefined)
          applySensorError(error, `${s.station}/${s.sensor}`, s.config.kind, msg.payload, t, opts.startMs);
        const spike = faultOf(s, 'spike', t);
        if (spike && !spiked.has(spike)) {
          spiked.add(spike);
          const key = s.kind === 'oxygen' ? firstO2Field(msg.payload) : 'temp_c';
          msg.payload[key] = r((msg.payload[key] as number) + (spike.spikeOffset ?? 0), 3);
        }
        if (s.kind === 'pco2') {
          if (faultOf(s, 'flatline', t)) {
            s.frozen ??= msg.payload.pco2_uatm as number;
            msg.payload.pco2_uatm = s.frozen;
          } else s.frozen = undefined;
        }
        const battery = faultOf(s, 'battery', t);
        msg.payload.battery_v = r(
          battery
            ? failingBatteryV(t, battery, s.rng.normal())
            : healthyBatteryV(snap.parUmolM2S, s.rng.normal()),
          2,
        );
        // Silent uplink: the sample is kept by its logger and sent with the backlog when the link returns.
        const outage = faultOf(s, 'silent', msg.tMs);
        if (outage) {
          backlog.set(msg, msg.tMs);
          msg.tMs = outage.endMs;
        }
        pending.push(msg);
      }
    }
    // The backlog of an outage goes out in the order it was taken.
    pending.sort((a, b) => a.tMs - b.tMs || (backlog.get(a) ?? a.tMs) - (backlog.get(b) ?? b.tMs));
    while (pending.length > 0 && (pending[0] as SimMessage).tMs < stepEnd) {
      const m = pending.shift() as SimMessage;
      backlog.delete(m);
      yield { type: 'message', message: m };
    }
  }
  for (const m of pending) if (m.tMs <= endMs) yield { type: 'message', message: m };
  for (const row of daily.finish(endMs)) yield { type: 'truth', row };
}

function firstO2Field(p: Record<string, unknown>): string {
  return p.o2_umol_l !== undefined ? 'o2_umol_l' : p.o2_mg_l !== undefined ? 'o2_mg_l' : 'o2_sat_pct';
}

function buildMessage(
  s: SensorRun,
  snap: ReefSnapshot,
  t: number,
  site: string,
  prefix: string,
): SimMessage | undefined {
  const st = snap.roles[s.role];
  const w = st.water;
  const topic = `${prefix}/${site}/${s.station}/${s.config.kind}/${s.sensor}`;
  const base = { v: 1 as const, t: iso(t), seq: s.seq++ };
  const n = () => s.rng.normal();
  const rho = density(w);
  const cal = s.cal;
  const gain = 1 + (cal?.gain ?? 0);
  switch (s.config.kind) {
    case 'ctd': {
      const tempC = w.tempC + (cal?.offset ?? 0) + 0.002 * n();
      const sal = w.sal + (cal?.offset2 ?? 0) + 0.003 * n();
      return { topic, tMs: t, payload: { ...base, temp_c: r(tempC, 4), sal: r(sal, 4) } };
    }
    case 'oxygen': {
      const tempC = r(w.tempC + 0.01 * n(), 3);
      const umolL = (gain * w.o2UmolKg * rho) / 1000 + 0.8 * n();
      const payload: Record<string, unknown> = { ...base, temp_c: tempC };
      if (s.config.sal_setting !== undefined) {
        // The optode computes with its own salinity setting (combined fit of Garcia & Gordon 1992), so it
        // reports O2(S_set) = O2(S)/factor, the inverse of the daemon's re-compensation (science 2.4).
        const factor = optodeSalinityFactor(w.sal, s.config.sal_setting, tempC);
        payload.o2_umol_l = r(Math.max(0, umolL / factor), 2);
      } else if (s.role === 'back') {
        payload.o2_mg_l = r(Math.max(0, gain * o2MgL(w.o2UmolKg, rho) + 0.025 * n()), 3);
      } else payload.o2_umol_l = r(Math.max(0, umolL), 2);
      return { topic, tMs: t, payload };
    }
    case 'pco2':
      return {
        topic,
        tMs: t,
        payload: {
          ...base,
          pco2_uatm: r(gain * speciate(w).pco2Uatm + 1.5 * n(), 1),
          temp_c: r(w.tempC + 0.02 * n(), 3),
        },
      };
    case 'par':
      return {
        topic,
        tMs: t,
        payload: { ...base, par_umol_m2_s: r(snap.parUmolM2S * (1 + 0.01 * n()) + 0.3 * n(), 1) },
      };
    case 'met':
      return {
        topic,
        tMs: t,
        payload: {
          ...base,
          wind_m_s: r(Math.max(0, snap.windMS + 0.3 * n()), 2),
          wind_dir_deg: r((((snap.windDirDeg + 8 * n()) % 360) + 360) % 360, 1),
          baro_hpa: r(snap.baroHpa + 0.05 * n(), 2),
          air_temp_c: r(snap.airTempC + 0.05 * n(), 2),
          xco2_air_ppm: r(snap.xco2Ppm + 0.3 * n(), 1),
        },
      };
    case 'sample': {
      const c = speciate(w);
      return {
        topic,
        tMs: t,
        payload: {
          ...base,
          ta_umol_kg: r(w.taUmolKg + 2 * n(), 1),
          dic_umol_kg: r(w.dicUmolKg + 2 * n(), 1),
          ph_total: r(c.phTotal, 4),
          sal: r(w.sal, 3),
          temp_c: r(w.tempC, 2),
        },
      };
    }
    case 'pressure': {
      const fast = s.role === 'crest';
      const fsHz = fast ? 4 : 2;
      const samples = 2048; // 4 Hz x 512 s on the crest, 2 Hz x 1024 s elsewhere
      const p = synthesizeBurst(
        {
          fsHz,
          samples,
          depthM: st.depthM + (cal?.offset ?? 0),
          depthRateMS: 0,
          sensorHeightM: s.config.height_m,
          hm0SsM: st.hrmsSsM * Math.SQRT2,
          tpS: st.tpS,
          hm0IgM: st.hm0IgM,
          rhoKgM3: rho,
          baroHpa: snap.baroHpa,
          noiseDbar: 0.0004,
        },
        s.rng,
      );
      const pDbar = Array.from(p, (x) => r(x, 4));
      return {
        topic,
        tMs: t + (samples / fsHz) * 1000,
        payload: { ...base, fs_hz: fsHz, p_dbar: pDbar, temp_c: r(w.tempC, 3) },
      };
    }
    case 'adcp': {
      const setup = s.adcp as AdcpSetup;
      const [east, north] = cal ? measuredCurrent(cal, st.eastMS, st.northMS) : [st.eastMS, st.northMS];
      const e = adcpEnsemble(setup, st.depthM, east, north, st.hrmsSsM * Math.SQRT2, s.rng);
      const dbar = snap.baroHpa / 100 + (rho * 9.80665 * (st.depthM - setup.heightM)) / 1e4;
      return {
        topic,
        tMs: t,
        payload: {
          ...base,
          coord: 'beam',
          blank_m: setup.blankM,
          bin_m: setup.binM,
          vel_m_s: e.vel,
          heading_deg: e.headingDeg,
          pitch_deg: e.pitchDeg,
          roll_deg: e.rollDeg,
          corr_pct: e.corr,
          echo: e.echo,
          pres_dbar: r(dbar, 4),
          temp_c: r(w.tempC, 3),
        },
      };
    }
    default: {
      // Every configurable kind has a message above: a new kind is a compile error here.
      const missing: never = s.config;
      return missing;
    }
  }
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
