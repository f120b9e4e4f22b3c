// The processor end to end on a hand-built steady deployment: every message goes through the contract
// parser, every record is checked against an independent computation or a physical expectation.
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type DerivedRecord, type SensorMessage } from '../contract/index.js';
import { solveCarbonate } from '../carbonate/index.js';
import { densityEos80, gravity, o2SatPct, recompensateO2Salinity } from '../seawater/index.js';
import { createProcessor } from './index.js';

const CONFIG = `
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
      o2: { kind: oxygen, sal_setting: 0 }
      co2: { kind: pco2 }
  mast:
    sensors:
      met: { kind: met }
transects:
  flat: { upstream: crest, downstream: back, length_m: 350, current: back, pq: 1.0 }
`;

const parsed = parseConfigText(CONFIG);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;

const T = 27;
const S = 35;
const RHO = densityEos80(S, T);
const G = gravity();
const DEPTH_M = 1.5;
const BARO_HPA = 1010;
const T0 = Date.UTC(2026, 2, 1, 0, 0, 0);
const MIN = 60_000;

// The truth of the steady slab: NCP and NEC, an upstream state, and the downstream state they produce
// over L at the ADCP velocity (the budget C_B - C_A = F L / (rho h U), docs/methods/metabolism.md 6.4, no air-sea term
// since the wind is calm).
const NCP = 40; // mmol O2 m-2 h-1
const NEC = 8; // mmol CaCO3 m-2 h-1
const O2_UP = 200; // umol/kg
const PCO2_UP = 420;

function msg(topic: string, body: Record<string, unknown>): SensorMessage {
  const r = parseMessage(`reef/test-reef/${topic}`, JSON.stringify({ v: 1, ...body }));
  if (!r.ok) throw new Error(`${topic}: ${r.reason}`);
  return r.message;
}

function burst(tMs: number): SensorMessage {
  // 2 Hz x 512 s of an 8 s swell of 0.1 m height at the surface, attenuated to the sensor by linear theory.
  const n = 1024;
  const fs = 2;
  const omega = (2 * Math.PI) / 8;
  let k = (omega * omega) / G;
  for (let i = 0; i < 50; i++) k = (omega * omega) / (G * Math.tanh(k * DEPTH_M));
  const kp = Math.cosh(k * 0.2) / Math.cosh(k * DEPTH_M);
  const p: number[] = [];
  for (let i = 0; i < n; i++) {
    const eta = 0.05 * Math.cos(omega * (i / fs));
    p.push(BARO_HPA / 100 + ((DEPTH_M - 0.2 + kp * eta) * RHO * G) / 1e4);
  }
  return msg('crest/pressure/p1', { t: new Date(tMs).toISOString(), fs_hz: fs, p_dbar: p });
}

function run(upDown: { o2Down: number; pco2Down: number } | undefined, hours: number) {
  const p = createProcessor(config);
  const records: DerivedRecord[] = [];
  const feed = (m: SensorMessage) => {
    const r = p.push(m, m.tMs + 500);
    records.push(...r.records);
    return r;
  };
  for (let t = T0; t < T0 + hours * 3600_000; t += MIN) {
    const iso = new Date(t).toISOString();
    feed(msg('mast/met/met', { t: iso, wind_m_s: 0, baro_hpa: BARO_HPA }));
    for (const st of ['crest', 'back']) feed(msg(`${st}/ctd/ctd`, { t: iso, temp_c: T, sal: S }));
    const o2Down = upDown?.o2Down ?? O2_UP;
    feed(msg('crest/oxygen/o2', { t: iso, o2_umol_l: (O2_UP * RHO) / 1000, temp_c: T }));
    // The back optode is set to S 0: it reports the concentration an S 0 calibration gives.
    const back0 = recompensateO2Salinity((o2Down * RHO) / 1000, T, 0, S);
    feed(msg('back/oxygen/o2', { t: iso, o2_umol_l: back0, temp_c: T }));
    if ((t - T0) % (2 * MIN) === 0) {
      feed(msg('crest/pco2/co2', { t: iso, pco2_uatm: PCO2_UP }));
      feed(msg('back/pco2/co2', { t: iso, pco2_uatm: upDown?.pco2Down ?? PCO2_UP }));
    }
    if ((t - T0) % (30 * MIN) === 0) {
      feed(burst(t));
      feed({ ...burst(t), station: 'back', sensor: 'p1' } as SensorMessage);
    }
    if ((t - T0) % (5 * MIN) === 0) {
      const bins = Array.from({ length: 12 }, () => [-0.1, 0, 0, 0.001]);
      feed(msg('back/adcp/adcp', { t: iso, coord: 'earth', blank_m: 0.1, bin_m: 0.1, vel_m_s: bins }));
    }
  }
  return { records, processor: p };
}

describe('per-reading records', () => {
  const { records } = run(undefined, 1);
  const ox = records.filter((r) => r.type === 'oxygen');
  const co2 = records.filter((r) => r.type === 'carbonate');

  it('converts umol/L to umol/kg and re-compensates an optode set to S 0 (docs/methods/seawater.md 2.3-2.4)', () => {
    const crest = ox.find((r) => r.station === 'crest')!;
    const back = ox.find((r) => r.station === 'back')!;
    expect(crest.o2_umol_kg).toBeCloseTo(O2_UP, 9);
    expect(back.o2_umol_kg).toBeCloseTo(O2_UP, 9);
    expect(crest.o2_sat_pct).toBeCloseTo(o2SatPct(O2_UP, S, T, BARO_HPA / 1013.25), 9);
    expect(crest.o2_mg_l).toBeCloseTo((O2_UP * RHO) / 1000 / (1000 / 31.9988), 9);
  });

  it('solves the carbonate system with TA from salinity at the CTD temperature', () => {
    const r = co2[0]!;
    const ref = solveCarbonate({
      salinity: S,
      tempC: T,
      pco2Uatm: PCO2_UP,
      taUmolKg: 2300,
      baroHpa: BARO_HPA,
    });
    if (!ref.ok) throw new Error(ref.reason);
    expect(r.ta_source).toBe('salinity');
    expect(r.ta_umol_kg).toBeCloseTo(2300, 9);
    expect(r.dic_umol_kg).toBeCloseTo(ref.dicUmolKg, 6);
    expect(r.omega_ar).toBeCloseTo(ref.omegaAr, 9);
    expect(r.pco2_uatm).toBeCloseTo(PCO2_UP, 6);
    // warm reef water at 420 uatm is supersaturated for aragonite by a wide margin (common practice)
    expect(r.omega_ar as number).toBeGreaterThan(3);
  });

  it('derives waves and depth from the bursts, and currents from the ADCP', () => {
    const w = records.find((r) => r.type === 'waves' && r.station === 'crest')!;
    expect(w.depth_m as number).toBeCloseTo(DEPTH_M, 2);
    expect(w.hm0_m as number).toBeGreaterThan(0.09); // monochromatic: Hm0 = 4 sqrt(a^2/2) = 0.141 m
    expect(w.hm0_m as number).toBeLessThan(0.16);
    expect(w.tp_s as number).toBeCloseTo(8, 0);
    // the first ensemble comes before any burst has completed: no depth yet, so no depth average
    const first = records.find((r) => r.type === 'current')!;
    expect(first.u_m_s).toBeNull();
    const c = records.find((r) => r.type === 'current' && r.u_m_s !== null)!;
    expect(c.u_m_s as number).toBeGreaterThan(0.09); // westward = shoreward with reef_axis 270
    expect(c.u_m_s as number).toBeLessThanOrEqual(0.1);
    expect(c.dir_to_deg as number).toBeCloseTo(270, 6);
  });
});

describe('flux windows', () => {
  // First pass gives the ADCP velocity and depths the budget will see; the truth is built on them.
  const first = run(undefined, 2).records.find((r) => r.type === 'flux' && r.u_m_s !== null)!;
  const U = first.u_m_s as number;
  const h = first.depth_m as number;
  const fac = 350 / (RHO * h * U); // umol/kg per umol m-2 s-1
  const o2Down = O2_UP + (NCP / 3.6) * fac;
  const up = solveCarbonate({ salinity: S, tempC: T, pco2Uatm: PCO2_UP, taUmolKg: 2300, baroHpa: BARO_HPA });
  if (!up.ok) throw new Error(up.reason);
  const taDown = up.taUmolKg - 2 * (NEC / 3.6) * fac;
  const dicDown = up.dicUmolKg - (NCP / 3.6 + NEC / 3.6) * fac;
  const down = solveCarbonate({
    salinity: S,
    tempC: T,
    taUmolKg: taDown,
    dicUmolKg: dicDown,
    baroHpa: BARO_HPA,
  });
  if (!down.ok) throw new Error(down.reason);
  const { records, processor } = run({ o2Down, pco2Down: down.pco2Uatm }, 4);
  const flux = records.filter((r) => r.type === 'flux' && r.valid);

  it('computes windows on the 10 min cadence, stamped at the window centre', () => {
    expect(flux.length).toBeGreaterThan(10);
    for (const f of flux) expect(new Date(f.t).getUTCMinutes() % 10).toBe(5);
  });

  it('recovers NCP from the O2 budget within 1 % (steady slab, docs/methods/metabolism.md 6.4)', () => {
    for (const f of flux.slice(3))
      expect(Math.abs((f.ncp_mmol_m2_h as number) - NCP) / NCP).toBeLessThan(0.01);
  });

  it('recovers NEC by the pCO2 + O2 inverse within 3 %', () => {
    for (const f of flux.slice(3)) {
      expect(f.nec_method).toBe('inverse');
      expect(Math.abs((f.nec_mmol_m2_h as number) - NEC) / NEC).toBeLessThan(0.03);
    }
  });

  it('reports the residence time L/U', () => {
    const f = flux.at(-1)!;
    expect(f.residence_min as number).toBeCloseTo(350 / U / 60, 6);
  });

  it('resumes from a snapshot and gives the same records as an uninterrupted run', () => {
    const all = run({ o2Down, pco2Down: down.pco2Uatm }, 3).records.map((r) => JSON.stringify(r));
    // the first 2 h, snapshot, a new processor from the JSON of the snapshot, the last hour
    const p1 = createProcessor(config);
    const out: string[] = [];
    const msgs: SensorMessage[] = [];
    const collect = (m: SensorMessage) => msgs.push(m);
    // rebuild the same message sequence by running and capturing what we feed
    for (let t = T0; t < T0 + 3 * 3600_000; t += MIN) {
      const iso = new Date(t).toISOString();
      collect(msg('mast/met/met', { t: iso, wind_m_s: 0, baro_hpa: BARO_HPA }));
      for (const st of ['crest', 'back']) collect(msg(`${st}/ctd/ctd`, { t: iso, temp_c: T, sal: S }));
      collect(msg('crest/oxygen/o2', { t: iso, o2_umol_l: (O2_UP * RHO) / 1000, temp_c: T }));
      collect(
        msg('back/oxygen/o2', {
          t: iso,
          o2_umol_l: recompensateO2Salinity((o2Down * RHO) / 1000, T, 0, S),
          temp_c: T,
        }),
      );
      if ((t - T0) % (2 * MIN) === 0) {
        collect(msg('crest/pco2/co2', { t: iso, pco2_uatm: PCO2_UP }));
        collect(msg('back/pco2/co2', { t: iso, pco2_uatm: down.pco2Uatm }));
      }
      if ((t - T0) % (30 * MIN) === 0) {
        collect(burst(t));
        collect({ ...burst(t), station: 'back', sensor: 'p1' } as SensorMessage);
      }
      if ((t - T0) % (5 * MIN) === 0) {
        const bins = Array.from({ length: 12 }, () => [-0.1, 0, 0, 0.001]);
        collect(msg('back/adcp/adcp', { t: iso, coord: 'earth', blank_m: 0.1, bin_m: 0.1, vel_m_s: bins }));
      }
    }
    const cut = Math.floor(msgs.length * (2 / 3));
    for (const m of msgs.slice(0, cut))
      out.push(...p1.push(m, m.tMs + 500).records.map((r) => JSON.stringify(r)));
    const p2 = createProcessor(config, JSON.parse(JSON.stringify(p1.snapshot())));
    for (const m of msgs.slice(cut))
      out.push(...p2.push(m, m.tMs + 500).records.map((r) => JSON.stringify(r)));
    expect(out).toEqual(all);
    expect(processor.counters().accepted).toBeGreaterThan(0);
  });
});

describe('intake rules', () => {
  it('drops duplicates by time and by seq, counts late messages, refuses a clock running ahead', () => {
    const p = createProcessor(config);
    const a = msg('crest/ctd/ctd', { t: new Date(T0).toISOString(), temp_c: 27, sal: 35, seq: 1 });
    expect(p.push(a, T0).status).toBe('ok');
    expect(p.push(a, T0).status).toBe('duplicate');
    const sameSeq = msg('crest/ctd/ctd', {
      t: new Date(T0 + MIN).toISOString(),
      temp_c: 27,
      sal: 35,
      seq: 1,
    });
    expect(p.push(sameSeq, T0 + MIN).status).toBe('duplicate');
    const ahead = msg('crest/ctd/ctd', { t: new Date(T0 + 3 * MIN).toISOString(), temp_c: 27, sal: 35 });
    expect(p.push(ahead, T0 + MIN).status).toBe('clock_fault');
    const later = msg('crest/ctd/ctd', { t: new Date(T0 + 60 * MIN).toISOString(), temp_c: 27, sal: 35 });
    p.push(later, T0 + 60 * MIN);
    const old = msg('crest/ctd/ctd', { t: new Date(T0 + 20 * MIN).toISOString(), temp_c: 27, sal: 35 });
    expect(p.push(old, T0 + 60 * MIN).late).toBe(true);
    expect(p.counters()).toMatchObject({ duplicates: 2, clockFaults: 1, late: 1 });
  });
});

describe('a logger that restarts its seq counter', () => {
  const ctdAt = (minute: number, seq: number) =>
    msg('crest/ctd/ctd', { t: new Date(T0 + minute * MIN).toISOString(), temp_c: 27, sal: 35, seq });

  it('keeps the messages after a reboot, counts the reboot once, still drops true repeats', () => {
    const p = createProcessor(config);
    for (let i = 0; i < 40; i++) expect(p.push(ctdAt(i, i), T0 + i * MIN).status).toBe('ok');
    // The logger reboots at minute 40: seq starts at 0 again, numbers it sent before its reboot.
    const first = p.push(ctdAt(40, 0), T0 + 40 * MIN);
    expect(first.status).toBe('ok');
    expect(first.seqRestart).toBe(true);
    for (let i = 1; i < 30; i++) {
      const r = p.push(ctdAt(40 + i, i), T0 + (40 + i) * MIN);
      expect(r.status).toBe('ok');
      expect(r.seqRestart).toBeUndefined();
    }
    expect(p.push(ctdAt(45, 5), T0 + 70 * MIN).status).toBe('duplicate');
    expect(p.counters()).toMatchObject({ accepted: 70, duplicates: 1, sensorReboots: 1 });
  });

  it('takes a late message with a lower seq for a late message, not a reboot', () => {
    const p = createProcessor(config);
    p.push(ctdAt(10, 10), T0 + 10 * MIN);
    const late = p.push(ctdAt(5, 5), T0 + 10 * MIN);
    expect(late.status).toBe('ok');
    expect(late.seqRestart).toBeUndefined();
    expect(p.counters().sensorReboots).toBeUndefined();
  });

  it('takes a 16-bit counter passing 65535 for a wrap, not a reboot', () => {
    const p = createProcessor(config);
    p.push(ctdAt(1, 65535), T0 + MIN);
    const next = p.push(ctdAt(2, 0), T0 + 2 * MIN);
    expect(next.status).toBe('ok');
    expect(next.seqRestart).toBeUndefined();
  });
});
