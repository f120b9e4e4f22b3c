// The simulator's sensor messages (contract section 1): what each kind of sensor reports from the reef state at
// one sample time, with its noise and calibration error. The faults and the send order are generate.ts's.
import type { SensorConfig } from '../contract/index.js';
import { adcpEnsemble, type AdcpSetup } from './adcp.js';
import { synthesizeBurst } from './burst.js';
import { measuredCurrent, type SensorCalibration } from './calibration-errors.js';
import { density, o2MgL, speciate } from './chemistry.js';
import type { SensorRef } from './faults.js';
import type { ReefSnapshot, RoleState } from './model.js';
import { optodeSalinityFactor } from './optode.js';
import type { Rng } from './prng.js';

export interface SimMessage {
  topic: string;
  payload: Record<string, unknown>;
  /** When the sensor sends it (ms): the sample time, or the end of a pressure burst. */
  tMs: number;
}

export interface SensorRun extends SensorRef {
  config: SensorConfig;
  rng: Rng;
  nextMs: number;
  seq: number;
  adcp?: AdcpSetup;
  frozen: number | undefined;
  /** Calibration errors (absent: a perfect sensor). */
  cal?: SensorCalibration;
}

/** x rounded to dp decimals, as the sensors report. */
export const round = (x: number, dp: number) => Math.round(x * 10 ** dp) / 10 ** dp;
export const isoTime = (ms: number) => new Date(ms).toISOString();
const r = round;

type ConfigOf<K extends SensorConfig['kind']> = Extract<SensorConfig, { kind: K }>;

/** What every kind's message is built from: the sensor, the reef state at its role, and the message's head. */
interface Sample {
  readonly s: SensorRun;
  readonly snap: ReefSnapshot;
  readonly st: RoleState;
  readonly w: RoleState['water'];
  readonly topic: string;
  readonly base: { v: 1; t: string; seq: number };
  readonly t: number;
  /** The sensor's next standard normal draw. */
  readonly n: () => number;
  readonly rho: number;
  readonly cal: SensorCalibration | undefined;
  readonly gain: number;
}

function ctdMessage(m: Sample): SimMessage {
  const { w, cal, n, base } = m;
  const tempC = w.tempC + (cal?.offset ?? 0) + 0.002 * n();
  const sal = w.sal + (cal?.offset2 ?? 0) + 0.003 * n();
  return { topic: m.topic, tMs: m.t, payload: { ...base, temp_c: r(tempC, 4), sal: r(sal, 4) } };
}

function oxygenMessage(m: Sample, config: ConfigOf<'oxygen'>): SimMessage {
  const { w, n, rho, gain } = m;
  const tempC = r(w.tempC + 0.01 * n(), 3);
  const umolL = (gain * w.o2UmolKg * rho) / 1000 + 0.8 * n();
  const payload: Record<string, unknown> = { ...m.base, temp_c: tempC };
  if (config.sal_setting !== undefined) {
    // The optode computes with its own salinity setting (combined fit of Garcia & Gordon 1992), so it
    // reports O2(S_set) = O2(S)/factor, the inverse of the daemon's re-compensation (science 2.4).
    const factor = optodeSalinityFactor(w.sal, config.sal_setting, tempC);
    payload.o2_umol_l = r(Math.max(0, umolL / factor), 2);
  } else if (m.s.role === 'back') {
    payload.o2_mg_l = r(Math.max(0, gain * o2MgL(w.o2UmolKg, rho) + 0.025 * n()), 3);
  } else payload.o2_umol_l = r(Math.max(0, umolL), 2);
  return { topic: m.topic, tMs: m.t, payload };
}

function pco2Message(m: Sample): SimMessage {
  const { w, n } = m;
  return {
    topic: m.topic,
    tMs: m.t,
    payload: {
      ...m.base,
      pco2_uatm: r(m.gain * speciate(w).pco2Uatm + 1.5 * n(), 1),
      temp_c: r(w.tempC + 0.02 * n(), 3),
    },
  };
}

function parMessage(m: Sample): SimMessage {
  const { snap, n } = m;
  return {
    topic: m.topic,
    tMs: m.t,
    payload: { ...m.base, par_umol_m2_s: r(snap.parUmolM2S * (1 + 0.01 * n()) + 0.3 * n(), 1) },
  };
}

function metMessage(m: Sample): SimMessage {
  const { snap, n } = m;
  return {
    topic: m.topic,
    tMs: m.t,
    payload: {
      ...m.base,
      wind_m_s: r(Math.max(0, snap.windMS + 0.3 * n()), 2),
      wind_dir_deg: r((((snap.windDirDeg + 8 * n()) % 360) + 360) % 360, 1),
      baro_hpa: r(snap.baroHpa + 0.05 * n(), 2),
      air_temp_c: r(snap.airTempC + 0.05 * n(), 2),
      xco2_air_ppm: r(snap.xco2Ppm + 0.3 * n(), 1),
    },
  };
}

function sampleMessage(m: Sample): SimMessage {
  const { w, n } = m;
  const c = speciate(w);
  return {
    topic: m.topic,
    tMs: m.t,
    payload: {
      ...m.base,
      ta_umol_kg: r(w.taUmolKg + 2 * n(), 1),
      dic_umol_kg: r(w.dicUmolKg + 2 * n(), 1),
      ph_total: r(c.phTotal, 4),
      sal: r(w.sal, 3),
      temp_c: r(w.tempC, 2),
    },
  };
}

function pressureMessage(m: Sample, config: ConfigOf<'pressure'>): SimMessage {
  const { s, st, w, snap, cal } = m;
  const fast = s.role === 'crest';
  const fsHz = fast ? 4 : 2;
  const samples = 2048; // 4 Hz x 512 s on the crest, 2 Hz x 1024 s elsewhere
  const p = synthesizeBurst(
    {
      fsHz,
      samples,
      depthM: st.depthM + (cal?.offset ?? 0),
      depthRateMS: 0,
      sensorHeightM: config.height_m,
      hm0SsM: st.hrmsSsM * Math.SQRT2,
      tpS: st.tpS,
      hm0IgM: st.hm0IgM,
      rhoKgM3: m.rho,
      baroHpa: snap.baroHpa,
      noiseDbar: 0.0004,
    },
    s.rng,
  );
  const pDbar = Array.from(p, (x) => r(x, 4));
  return {
    topic: m.topic,
    tMs: m.t + (samples / fsHz) * 1000,
    payload: { ...m.base, fs_hz: fsHz, p_dbar: pDbar, temp_c: r(w.tempC, 3) },
  };
}

function adcpMessage(m: Sample): SimMessage {
  const { s, st, w, snap, cal } = m;
  const setup = s.adcp as AdcpSetup;
  const [east, north] = cal ? measuredCurrent(cal, st.eastMS, st.northMS) : [st.eastMS, st.northMS];
  const e = adcpEnsemble(setup, st.depthM, east, north, st.hrmsSsM * Math.SQRT2, s.rng);
  const dbar = snap.baroHpa / 100 + (m.rho * 9.80665 * (st.depthM - setup.heightM)) / 1e4;
  return {
    topic: m.topic,
    tMs: m.t,
    payload: {
      ...m.base,
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

/** The message sensor s sends for its sample at t (its sequence number advances by one). */
export function buildMessage(
  s: SensorRun,
  snap: ReefSnapshot,
  t: number,
  site: string,
  prefix: string,
): SimMessage | undefined {
  const st = snap.roles[s.role];
  const w = st.water;
  const topic = `${prefix}/${site}/${s.station}/${s.config.kind}/${s.sensor}`;
  const base = { v: 1 as const, t: isoTime(t), seq: s.seq++ };
  const n = () => s.rng.normal();
  const rho = density(w);
  const cal = s.cal;
  const gain = 1 + (cal?.gain ?? 0);
  const m: Sample = { s, snap, st, w, topic, base, t, n, rho, cal, gain };
  switch (s.config.kind) {
    case 'ctd':
      return ctdMessage(m);
    case 'oxygen':
      return oxygenMessage(m, s.config);
    case 'pco2':
      return pco2Message(m);
    case 'par':
      return parMessage(m);
    case 'met':
      return metMessage(m);
    case 'sample':
      return sampleMessage(m);
    case 'pressure':
      return pressureMessage(m, s.config);
    case 'adcp':
      return adcpMessage(m);
    default: {
      // Every configurable kind has a message above: a new kind is a compile error here.
      const missing: never = s.config;
      return missing;
    }
  }
}
