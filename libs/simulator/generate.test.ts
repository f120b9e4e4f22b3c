import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  MAX_PAYLOAD_BYTES,
  parseConfigText,
  parseMessage,
  type AdcpMessage,
  type PressureMessage,
} from '../contract/index.js';
import { processEnsemble } from '../currents/index.js';
import { analyzeBurst } from '../waves/index.js';
import { simulateMessages, type SimMessage } from './generate.js';
import { densityEos80 as densityKgM3 } from '../seawater/index.js';
import { optodeSalinityFactor } from './optode.js';
import type { FaultTruth, StationTruth, TransectTruth } from './truth.js';

function ornenConfig() {
  const text = readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8');
  const r = parseConfigText(text);
  if (!r.ok) throw new Error(`demo config invalid: ${JSON.stringify(r.problems)}`);
  return r.config;
}

const config = ornenConfig();
const START = Date.UTC(2026, 2, 1);
const H = 3.6e6;
const run = simulateMessages(config, { startMs: START, durationMs: 26 * H, seed: 2026 });
const stationRows = run.truth.filter((r): r is StationTruth => r.kind === 'station');

/** The truth row of a station nearest in time. */
function truthAt(station: string, tMs: number): StationTruth {
  let best: StationTruth | undefined;
  for (const r of stationRows) {
    if (r.station !== station) continue;
    if (!best || Math.abs(Date.parse(r.t) - tMs) < Math.abs(Date.parse(best.t) - tMs)) best = r;
  }
  if (!best) throw new Error(`no truth for ${station}`);
  return best;
}

const parsed = (m: SimMessage) => {
  const p = parseMessage(m.topic, JSON.stringify(m.payload), config.topic_prefix);
  if (!p.ok) throw new Error(`${m.topic}: ${p.reason}`);
  return p.message;
};

describe('simulateMessages', () => {
  it('every message validates against the contract and stays under the payload limit', () => {
    const kinds = new Set<string>();
    for (const m of run.messages) {
      const text = JSON.stringify(m.payload);
      expect(text.length).toBeLessThan(MAX_PAYLOAD_BYTES);
      const p = parseMessage(m.topic, text, config.topic_prefix);
      if (!p.ok) throw new Error(`${m.topic} rejected: ${p.reason}`);
      kinds.add(p.message.kind);
    }
    expect([...kinds].sort()).toEqual(['adcp', 'ctd', 'met', 'oxygen', 'par', 'pco2', 'pressure']);
  });

  it('sends in time order, each sensor on its cadence with a rising seq', () => {
    for (let i = 1; i < run.messages.length; i++) {
      expect(run.messages[i]!.tMs).toBeGreaterThanOrEqual(run.messages[i - 1]!.tMs);
    }
    const ctd = run.messages.filter((m) => m.topic.endsWith('/ctd/ctd-crest'));
    expect(ctd.length).toBe(26 * 12); // one every 300 s
    expect(ctd.map((m) => m.payload.seq)).toEqual(ctd.map((_, i) => i));
  });

  it('is deterministic: the same seed gives identical output, another seed differs', () => {
    const opts = { startMs: START, durationMs: 3 * H, seed: 99 };
    const a = simulateMessages(config, opts);
    const b = simulateMessages(config, opts);
    const c = simulateMessages(config, { ...opts, seed: 100 });
    expect(JSON.stringify(b)).toBe(JSON.stringify(a));
    expect(JSON.stringify(c.messages)).not.toBe(JSON.stringify(a.messages));
  });

  it('pressure bursts give back the truth Hm0 and depth through the waves library', () => {
    const bursts = run.messages.filter((m) => m.topic.includes('/pressure/')).slice(0, 60);
    expect(bursts.length).toBe(60);
    for (const m of bursts) {
      const msg = parsed(m) as PressureMessage;
      const station = msg.station;
      const truth = truthAt(station, msg.tMs);
      const sensor = config.stations[station]!.sensors[msg.sensor]!;
      const p = Float64Array.from(msg.p_dbar, (x) => x ?? Number.NaN);
      const baro = run.messages.find((x) => x.topic.includes('/met/') && Math.abs(x.tMs - msg.tMs) < 300_000);
      const res = analyzeBurst({
        pDbar: p,
        fsHz: msg.fs_hz,
        t0Ms: msg.tMs,
        sensorHeightM: sensor.kind === 'pressure' ? sensor.height_m : 0,
        patmDbar: ((baro?.payload.baro_hpa as number | undefined) ?? 1010) / 100,
        rhoKgM3: densityKgM3(truth.sal, truth.temp_c),
      });
      if (!res.ok) throw new Error(res.reason);
      // Depth to 3 cm (the barometer's noise, the tide within the burst). Hm0 of the sea-swell band: the
      // Kp^2 >= 0.1 cutoff drops the spectral tail above it (science 4.3), a few % of the energy on the flat
      // and up to ~15 % of Hm0 for the short lagoon sea, so the analysis reads 0.85-1.1 of the truth.
      expect(Math.abs(res.depthM - truth.depth_m)).toBeLessThan(0.03);
      expect(res.hm0SsM / truth.hm0_ss_m).toBeGreaterThan(0.85);
      expect(res.hm0SsM / truth.hm0_ss_m).toBeLessThan(1.1);
      if (res.hm0IgM !== null && truth.hm0_ig_m > 0.1) expect(res.hm0IgM / truth.hm0_ig_m).toBeCloseTo(1, 0);
    }
  });

  it('ADCP beam ensembles give back the truth depth-averaged current through the currents library', () => {
    const ens = run.messages.filter((m) => m.topic.includes('/adcp/')).slice(0, 80);
    let checked = 0;
    for (const m of ens) {
      const msg = parsed(m) as AdcpMessage;
      const truth = truthAt(msg.station, msg.tMs);
      const sc = config.stations[msg.station]!.sensors[msg.sensor]!;
      if (sc.kind !== 'adcp') throw new Error('not an adcp');
      const res = processEnsemble(
        {
          coord: msg.coord,
          blankM: msg.blank_m,
          binM: msg.bin_m,
          velMS: msg.vel_m_s,
          headingDeg: msg.heading_deg!,
          pitchDeg: msg.pitch_deg!,
          rollDeg: msg.roll_deg!,
          corrPct: msg.corr_pct!,
          echo: msg.echo!,
        },
        {
          heightM: sc.height_m,
          beamAngleDeg: sc.beam_angle_deg,
          orientation: 'up',
          declinationDeg: sc.declination_deg,
        },
        // Without hm0SsM: the trough rule of science 5.3 (D - Hm0/2) leaves too few bins on the saturated
        // flat and crest for the 40 % coverage of 5.5; this test checks the beam geometry, not that rule.
        { depthM: truth.depth_m, reefAxisDeg: config.reef_axis_deg },
      );
      if (!res.ok) throw new Error(`${msg.station}: ${res.code}`);
      // The side-lobe layer and the surface garbage must be rejected, and the mean within 1.5 cm/s
      // (bin noise 6 mm/s per beam; constant-top extrapolation of a 1/6 power profile, science 5.5).
      expect(res.binsUsed).toBeLessThan(msg.vel_m_s.length);
      expect(Math.abs(res.eastMS - truth.east_m_s)).toBeLessThan(0.015 + 0.08 * truth.speed_m_s);
      expect(Math.abs(res.northMS - truth.north_m_s)).toBeLessThan(0.015 + 0.08 * truth.speed_m_s);
      checked++;
    }
    expect(checked).toBe(80);
  });

  it('keeps flat currents at 0.01-0.26 m/s and crest currents at 0.1-0.5 m/s', () => {
    // Common practice for wave-driven reef flows.
    for (const r of stationRows) {
      if (r.station === 'flat') {
        expect(r.speed_m_s).toBeGreaterThanOrEqual(0.01);
        expect(r.speed_m_s).toBeLessThanOrEqual(0.26);
      }
      if (r.station === 'crest') {
        expect(r.speed_m_s).toBeGreaterThanOrEqual(0.1);
        expect(r.speed_m_s).toBeLessThanOrEqual(0.5);
      }
    }
  });

  it('stages the scripted faults: a pCO2 flat line, a stale CTD, a spike and a low battery', () => {
    const faults = run.truth.filter((r): r is FaultTruth => r.kind === 'fault');
    const of = (f: string) => faults.find((x) => x.fault === f)!;
    const flat = of('flatline');
    const frozen = run.messages.filter(
      (m) => m.topic.endsWith(`/${flat.sensor}`) && m.tMs >= flat.startMs && m.tMs < flat.endMs,
    );
    expect(frozen.length).toBeGreaterThan(20);
    expect(new Set(frozen.map((m) => m.payload.pco2_uatm)).size).toBe(1);
    const stale = of('stale');
    const during = run.messages.filter(
      (m) => m.topic.endsWith(`/${stale.sensor}`) && m.tMs >= stale.startMs && m.tMs < stale.endMs,
    );
    expect(during.length).toBe(0);
    expect(stale.endMs - stale.startMs).toBeGreaterThan(60 * 60_000);
    const bat = of('battery');
    const last = run.messages.filter((m) => m.topic.endsWith(`/${bat.sensor}`)).at(-1)!;
    expect(last.payload.battery_v as number).toBeLessThan(11);
    const spike = faults.find((x) => x.fault === 'spike' && x.sensor === 'o2-crest')!;
    const o2 = run.messages.filter((m) => m.topic.endsWith('/o2-crest'));
    const i = o2.findIndex((m) => m.tMs >= spike.startMs);
    const v = (k: number) => o2[k]!.payload.o2_umol_l as number;
    expect(v(i) - (v(i - 1) + v(i + 1)) / 2).toBeGreaterThan(60);
  });

  it('stages a silent uplink: nothing is sent for 40 min, then the backlog in sample order, no event-time gap', () => {
    const f = run.truth.find((r): r is FaultTruth => r.kind === 'fault' && r.fault === 'silent')!;
    expect([f.station, f.sensor]).toEqual(['*', '*']);
    expect(f.endMs - f.startMs).toBe(40 * 60_000);
    expect(run.messages.filter((m) => m.tMs >= f.startMs && m.tMs < f.endMs)).toEqual([]);
    const backlog = run.messages.filter((m) => m.tMs === f.endMs);
    // Every sensor's samples of those 40 min: 8 per 5-min sensor (12 of them), 4 per 10-min one (8), 1-2 bursts
    // per pressure gauge (6): about 135 at the demo site.
    expect(backlog.length).toBeGreaterThanOrEqual(96 + 32 + 6);
    expect(backlog.length).toBeLessThanOrEqual(96 + 32 + 12);
    // In the order the loggers would have sent them: sample time, except a burst, sent when it ends.
    const sampleMs = backlog
      .filter((m) => !m.topic.includes('/pressure/'))
      .map((m) => Date.parse(m.payload.t as string));
    expect(sampleMs).toEqual([...sampleMs].sort((a, b) => a - b));
    expect(Math.min(...sampleMs)).toBeGreaterThanOrEqual(f.startMs);
    // A CTD's event times keep their 5-min cadence through the outage.
    const ctd = run.messages
      .filter((m) => m.topic.endsWith('/ctd-crest'))
      .map((m) => Date.parse(m.payload.t as string))
      .sort((a, b) => a - b);
    const gaps = ctd.slice(1).map((t, i) => t - ctd[i]!);
    expect(Math.max(...gaps)).toBe(5 * 60_000);
  });

  it('the failing battery starts from the healthy night level and falls 2 V over its window', () => {
    const f = run.truth.find((r): r is FaultTruth => r.kind === 'fault' && r.fault === 'battery')!;
    const v = run.messages
      .filter((m) => m.topic.endsWith(`/${f.sensor}`) && m.tMs >= f.startMs)
      .map((m) => m.payload.battery_v as number);
    expect(v[0]!).toBeGreaterThan(12.5);
    expect(v[0]!).toBeLessThan(12.7);
    expect(v.at(-1)!).toBeLessThan(10.75);
  });

  it('the optode set to S = 0 reads high, and re-compensation gives the truth back', () => {
    // An optode set to 0 reads ~20 % high in S 35 water (docs/methods/seawater.md 2.4).
    const msgs = run.messages.filter((m) => m.topic.endsWith('/o2-flat')).slice(0, 50);
    for (const m of msgs) {
      const truth = truthAt('flat', Date.parse(m.payload.t as string)); // sample time: a backlog is sent later;
      const raw = m.payload.o2_umol_l as number;
      expect(raw / (truth.o2_umol_kg * 1.022)).toBeGreaterThan(1.15);
      const fixed = raw * optodeSalinityFactor(truth.sal, 0, m.payload.temp_c as number);
      const umolKg = (fixed * 1000) / densityKgM3(truth.sal, truth.temp_c); // umol/L to umol/kg (science 2.3)
      expect(Math.abs(umolKg - truth.o2_umol_kg)).toBeLessThan(4); // optode noise 0.8 umol/L; 5-min truth grid
    }
  });

  it('the truth is self-consistent: the O2 gradient across a transect gives back its NCP', () => {
    // Steady control-volume budget (science 6.4): NCP ~ 3.6 rho h U (O2_B - O2_A)/L; the storage and
    // air-sea terms it leaves out are small over a ~35 min residence, so the median ratio is near 1.
    const transects = run.truth.filter(
      (r): r is TransectTruth => r.kind === 'transect' && r.transect === 'outer',
    );
    const ratios: number[] = [];
    for (const tr of transects) {
      if (Math.abs(tr.ncp_mmol_m2_h) < 10) continue;
      const a = stationRows.find((r) => r.station === 'crest' && r.t === tr.t)!;
      const b = stationRows.find((r) => r.station === 'flat' && r.t === tr.t)!;
      const est =
        (3.6 * 1022 * tr.depth_m * tr.u_m_s * (b.o2_umol_kg - a.o2_umol_kg)) /
        config.transects.outer!.length_m;
      ratios.push(est / tr.ncp_mmol_m2_h);
    }
    ratios.sort((x, y) => x - y);
    expect(ratios.length).toBeGreaterThan(50);
    const median = ratios[Math.floor(ratios.length / 2)]!;
    expect(median).toBeGreaterThan(0.8);
    expect(median).toBeLessThan(1.2);
  });

  it('has a low-oxygen night in the lagoon: below 2 mg/L for more than an hour', () => {
    const lagoon = stationRows.filter((r) => r.station === 'lagoon');
    const lowMinutes = lagoon.filter((r) => r.o2_mg_l < 2).length * 10;
    expect(lowMinutes).toBeGreaterThan(60);
    // ... and the optode messages show it too (umol/L / 31.2512 = mg/L, docs/methods/seawater.md 2.3).
    const low = run.messages.filter(
      (m) => m.topic.endsWith('/o2-lagoon') && (m.payload.o2_umol_l as number) / 31.2512 < 2,
    );
    expect(low.length).toBeGreaterThan(12);
  });
});
