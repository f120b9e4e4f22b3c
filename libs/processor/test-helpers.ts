// A small synthetic deployment for the processor's tests: two stations of one transect and a mast, every
// sensor with its own seeded noise and resolution (so no test of libs/qc mistakes it for frozen), and sensor
// faults scripted over spans. Steady water: a fixed O2 and pCO2 difference between the stations gives NCP and
// NEC of a few mmol m-2 h-1, a 0.1 m/s current gives a residence of about an hour.
import { parseConfigText, parseMessage, type DerivedRecord, type SensorMessage } from '../contract/index.js';
import { densityEos80, gravity } from '../seawater/index.js';
import { createRng } from '../simulator/index.js';
import { createProcessor, type ProcessorOptions, type ProcessorState } from './index.js';

export const DEPLOYMENT_CONFIG = `
site: test-reef
reef_axis_deg: 270
stations:
  crest:
    sensors:
      p1: { kind: pressure, height_m: 0.20 }
      ctd: { kind: ctd }
      o2: { kind: oxygen }
      co2: { kind: pco2 }
  back:
    sensors:
      p1: { kind: pressure, height_m: 0.20 }
      adcp: { kind: adcp, height_m: 0.3, beam_angle_deg: 25 }
      ctd: { kind: ctd }
      o2: { kind: oxygen }
      co2: { kind: pco2 }
      bottle: { kind: sample }
  mast:
    sensors:
      met: { kind: met }
transects:
  flat: { upstream: crest, downstream: back, length_m: 350, current: back, pq: 1.0 }
`;

const parsed = parseConfigText(DEPLOYMENT_CONFIG);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
export const deploymentConfig = parsed.config;

export const T0 = Date.UTC(2026, 2, 1);
export const MIN = 60_000;
export const HOUR = 3_600_000;
const T = 27;
const S = 35;
const RHO = densityEos80(S, T);
const G = gravity();
const DEPTH_M = 1.5;
const BARO_HPA = 1010;

/** Scripted faults over [fromMs, toMs) (absolute times). */
export interface Script {
  /** The back reef's pCO2 repeats its last reading. */
  freezeBackPco2?: [number, number];
  /** The crest CTD sends nothing. */
  silenceCrestCtd?: [number, number];
  /** The barometer repeats its last reading. */
  freezeBaro?: [number, number];
  /**
   * The crest optode drifts this much high over the span, ramping up and down over an hour at each end (a
   * fouled optode: past the user range it is suspect, and it never jumps).
   */
  crestO2OffsetUmolL?: { span: [number, number]; offset: number };
  /** One crest temperature reading this much high, at this time. */
  crestTempSpike?: { atMs: number; offset: number };
  /** Bottle samples at the back reef at these times. */
  bottlesAt?: number[];
  /**
   * O2 at both stations swings together, amplitude (umol/L) and period (h): the transect's mean O2 changes in
   * time (storage) while its gradient, and so the advection, stays.
   */
  o2Swing?: { amplitudeUmolL: number; periodH: number };
  /** Light air (0.3 m/s): the air-sea exchange is negligible, so NCP is the budget's storage and advection. */
  calm?: boolean;
}

/** The swing's O2 at time t, umol/L (0 without one). */
export function o2SwingAt(t: number, script: Script): number {
  const w = script.o2Swing;
  return w === undefined ? 0 : w.amplitudeUmolL * Math.sin((2 * Math.PI * (t - T0)) / (w.periodH * HOUR));
}

const within = (t: number, span: [number, number] | undefined): boolean =>
  span !== undefined && t >= span[0] && t < span[1];

function rampOffset(t: number, o: Script['crestO2OffsetUmolL']): number {
  if (o === undefined) return 0;
  const [a, b] = o.span;
  return o.offset * Math.max(0, Math.min(1, (t - a) / HOUR, (b - t) / HOUR));
}

function msg(topic: string, body: Record<string, unknown>): SensorMessage {
  const r = parseMessage(`reef/test-reef/${topic}`, JSON.stringify({ v: 1, ...body }));
  if (!r.ok) throw new Error(`${topic}: ${r.reason}`);
  return r.message;
}

const round = (x: number, dp: number): number => Math.round(x * 10 ** dp) / 10 ** dp;

/** A 2 Hz x 512 s pressure burst of an 8-s swell over a depth `depthM` (linear theory to the sensor). */
function burst(topic: string, tMs: number, depthM: number): SensorMessage {
  const n = 1024;
  const fs = 2;
  const omega = (2 * Math.PI) / 8;
  let k = (omega * omega) / G;
  for (let i = 0; i < 50; i++) k = (omega * omega) / (G * Math.tanh(k * depthM));
  const kp = Math.cosh(k * 0.2) / Math.cosh(k * depthM);
  const p: number[] = [];
  for (let i = 0; i < n; i++) {
    const eta = 0.05 * Math.cos(omega * (i / fs));
    p.push(round(BARO_HPA / 100 + ((depthM - 0.2 + kp * eta) * RHO * G) / 1e4, 5));
  }
  return msg(topic, { t: new Date(tMs).toISOString(), fs_hz: fs, p_dbar: p });
}

/** The messages of `hours` of the deployment, in event-time order, with the script's faults. */
export function deploymentMessages(hours: number, script: Script = {}, seed = 1): SensorMessage[] {
  const rng = createRng(seed);
  const n = () => rng.normal();
  const out: SensorMessage[] = [];
  let frozenPco2: number | undefined;
  let frozenBaro: number | undefined;
  for (let t = T0; t < T0 + hours * HOUR; t += 5 * MIN) {
    const iso = new Date(t).toISOString();
    const tide = 0.2 * Math.sin((2 * Math.PI * (t - T0)) / (12.42 * HOUR));
    let baro = round(BARO_HPA + 0.3 * Math.sin((2 * Math.PI * (t - T0)) / (12 * HOUR)) + 0.05 * n(), 2);
    if (within(t, script.freezeBaro)) baro = frozenBaro ??= baro;
    const wind = round(Math.abs((script.calm === true ? 0.3 : 5) + 0.3 * n()), 2);
    out.push(msg('mast/met/met', { t: iso, wind_m_s: wind, baro_hpa: baro }));
    for (const st of ['crest', 'back']) {
      if (st === 'crest' && within(t, script.silenceCrestCtd)) continue;
      const spike = st === 'crest' && script.crestTempSpike?.atMs === t ? script.crestTempSpike.offset : 0;
      out.push(
        msg(`${st}/ctd/ctd`, {
          t: iso,
          temp_c: round(T + 0.003 * n() + spike, 4),
          sal: round(S + 0.003 * n(), 4),
        }),
      );
    }
    const o2Off = rampOffset(t, script.crestO2OffsetUmolL);
    const swing = o2SwingAt(t, script);
    out.push(
      msg('crest/oxygen/o2', { t: iso, o2_umol_l: round(205 + swing + o2Off + 0.4 * n(), 2), temp_c: T }),
    );
    out.push(msg('back/oxygen/o2', { t: iso, o2_umol_l: round(215 + swing + 0.4 * n(), 2), temp_c: T }));
    if ((t - T0) % (10 * MIN) === 0) {
      out.push(msg('crest/pco2/co2', { t: iso, pco2_uatm: round(420 + 1.5 * n(), 1) }));
      let back = round(405 + 1.5 * n(), 1);
      if (within(t, script.freezeBackPco2)) back = frozenPco2 ??= back;
      out.push(msg('back/pco2/co2', { t: iso, pco2_uatm: back }));
      const bins = Array.from({ length: 12 }, () => [
        round(-0.1 + 0.005 * n(), 4),
        round(0.005 * n(), 4),
        0,
        0.001,
      ]);
      const pres = round(BARO_HPA / 100 + ((DEPTH_M + tide - 0.3) * RHO * G) / 1e4, 4);
      out.push(
        msg('back/adcp/adcp', {
          t: iso,
          coord: 'earth',
          blank_m: 0.1,
          bin_m: 0.1,
          vel_m_s: bins,
          pres_dbar: pres,
        }),
      );
    }
    if ((t - T0) % (30 * MIN) === 0) {
      out.push(burst('crest/pressure/p1', t, DEPTH_M + tide + 0.002 * n()));
      out.push(burst('back/pressure/p1', t, DEPTH_M + tide + 0.002 * n()));
    }
    if (script.bottlesAt?.includes(t)) {
      out.push(msg('back/sample/bottle', { t: iso, ta_umol_kg: round(2290 + n(), 1), sal: S }));
    }
  }
  return out;
}

/** A processor on the deployment, fed messages received 1 s after their time. */
export function startDeployment(options: ProcessorOptions = {}, restored?: ProcessorState) {
  const processor = createProcessor(deploymentConfig, restored, options);
  const feed = (messages: readonly SensorMessage[]): DerivedRecord[] => {
    const records: DerivedRecord[] = [];
    for (const m of messages) records.push(...processor.push(m, m.tMs + 1000).records);
    return records;
  };
  return { processor, feed };
}

/** The messages through a processor, then drained: every record. */
export function runDeployment(
  messages: readonly SensorMessage[],
  options: ProcessorOptions = {},
): { records: DerivedRecord[]; processor: ReturnType<typeof createProcessor> } {
  const { processor, feed } = startDeployment(options);
  const records = feed(messages);
  records.push(...processor.drain());
  return { records, processor };
}

/** Flux records of the run. */
export const fluxes = (records: readonly DerivedRecord[]) => records.filter((r) => r.type === 'flux');
