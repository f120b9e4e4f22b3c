import { describe, expect, it } from 'vitest';
import { solarElevationDeg, sunEvents } from '../daily/index.js';
import { O2_MG_L_PER_MMOL_M3 } from './box-model.js';
import type { ForecastPlan } from './plan.js';
import type { ForecastRecord } from './record.js';
import { modelledFlow } from './modelled-flow.js';
import { stepForecast } from './schedule.js';
import {
  createForecastState,
  observeCurrent,
  observeDepth,
  observeOffshoreWaves,
  observeOxygen,
  observePar,
  observeRespiration,
  type ForecastState,
} from './state.js';

const LAT = 8;
const LON = -145;
const PLAN: ForecastPlan = {
  site: 'test-reef',
  latDeg: LAT,
  lonDeg: LON,
  offshoreStation: 'fore',
  transects: [
    { id: 'outer', upstream: 'crest', downstream: 'flat', current: 'flat', lengthM: 180, bearingDeg: 270 },
  ],
  stations: [
    { station: 'crest', kind: 'persistence' },
    { station: 'flat', kind: 'transect', transect: 'outer' },
  ],
};
const START = Date.UTC(2026, 5, 1, 10);
const H = 3.6e6;

/** A synthetic reef that obeys the transect model at night: tide, waves, flow u = 0.03 H h^-0.5 at the
 * current station (the flat), crest O2 with a daily cycle, flat O2 = crest - R L/(u h_flat) (continuity; plus
 * daytime production). */
const reef = {
  tide: (t: number) => 0.4 * Math.cos((2 * Math.PI * (t - START)) / (12.4206012 * H)),
  hm0: (t: number) => 1.2 + 0.3 * Math.sin((2 * Math.PI * (t - START)) / (3 * 24 * H)),
  depthFlat: (t: number) => 1.3 + reef.tide(t),
  depthCrest: (t: number) => 1.1 + reef.tide(t),
  u: (t: number) => 0.03 * reef.hm0(t) * reef.depthFlat(t) ** -0.5,
  sun: (t: number) => Math.max(0, Math.sin((solarElevationDeg(t, LAT, LON) * Math.PI) / 180)),
  crest: (t: number) => 6.2 + 0.6 * reef.sun(t - 2 * H),
  flat: (t: number) => {
    const tauH = 180 / reef.u(t) / 3600;
    return reef.crest(t) - (19 * O2_MG_L_PER_MMOL_M3 * tauH) / reef.depthFlat(t) + 1.5 * reef.sun(t);
  },
};

function run(untilMs: number, checkpointEveryMs?: number, withPar = false) {
  let s: ForecastState = createForecastState();
  const records: ForecastRecord[] = [];
  let nextCheckpoint = START + (checkpointEveryMs ?? Infinity);
  for (let t = START; t < untilMs; t += 10 * 60_000) {
    observeOxygen(s, 'crest', t, reef.crest(t));
    observeOxygen(s, 'flat', t, reef.flat(t));
    if (t % (30 * 60_000) === 0) {
      observeDepth(s, 'crest', t, reef.depthCrest(t));
      observeDepth(s, 'flat', t, reef.depthFlat(t));
      observeOffshoreWaves(s, t, reef.hm0(t));
    }
    if (withPar) observePar(s, t, 2000 * reef.sun(t + 20 * 60_000));
    observeCurrent(s, 'outer', t, reef.u(t), reef.depthFlat(t));
    if ((t - START) % (24 * H) === 0) observeRespiration(s, 'outer', t, 19, 0.5);
    records.push(...stepForecast(s, PLAN, t).records);
    if (t >= nextCheckpoint) {
      s = JSON.parse(JSON.stringify(s)) as ForecastState;
      nextCheckpoint += checkpointEveryMs!;
    }
  }
  return records;
}

describe('the night schedule', () => {
  const records = run(START + 5.5 * 24 * H);
  const sets = sunEvents(START, START + 6 * 24 * H, LAT, LON).filter((e) => e.kind === 'set');
  const rises = sunEvents(START, START + 6 * 24 * H, LAT, LON).filter((e) => e.kind === 'rise');

  it('issues at dusk and every hour until sunrise, for every station, and never by day', () => {
    const flat = records.filter((r) => r.station === 'flat');
    const firstNight = flat.filter(
      (r) => Date.parse(r.t) < rises[0]!.tMs + 24 * H && Date.parse(r.t) > sets[0]!.tMs - 1,
    );
    expect(Date.parse(firstNight[0]!.t)).toBe(sets[0]!.tMs);
    const gaps = firstNight.slice(1).map((r, i) => Date.parse(r.t) - Date.parse(firstNight[i]!.t));
    expect(new Set(gaps)).toEqual(new Set([H]));
    for (const r of records) {
      expect(solarElevationDeg(Date.parse(r.t), LAT, LON)).toBeLessThan(-0.8);
      expect(Date.parse(r.sunrise)).toBeGreaterThan(Date.parse(r.t));
      expect(r.horizon_h).toBeCloseTo((Date.parse(r.t_min) - Date.parse(r.t)) / H, 3);
      expect(Date.parse(r.t_min)).toBeLessThanOrEqual(Date.parse(r.sunrise));
      expect(Date.parse(r.t_min)).toBeGreaterThanOrEqual(Date.parse(r.t));
    }
    expect(records.filter((r) => r.station === 'crest').length).toBe(flat.length);
    expect(flat[0]!.lead_h).toBe(0);
  });

  it('once the models are fitted, the flat forecast matches the synthetic truth within 0.15 mg/L', () => {
    const later = records.filter((r) => r.station === 'flat' && Date.parse(r.t) > START + 3 * 24 * H);
    expect(later.length).toBeGreaterThan(10);
    for (const r of later) {
      let truth = Infinity;
      for (let t = Date.parse(r.t); t <= Date.parse(r.sunrise); t += 5 * 60_000)
        truth = Math.min(truth, reef.flat(t));
      expect(r.model).toBe('transect');
      expect(Math.abs(r.o2_min_mg_l - truth)).toBeLessThan(0.15);
      expect(r.o2_min_lo_mg_l).toBeLessThanOrEqual(r.o2_min_mg_l);
      expect(r.o2_min_hi_mg_l).toBeGreaterThanOrEqual(r.o2_min_mg_l);
    }
  });

  it('a JSON checkpoint round trip at any time changes no forecast (replay equals live)', () => {
    expect(run(START + 5.5 * 24 * H, 7 * H + 10 * 60_000)).toEqual(records);
  });

  it('with a PAR sensor, dusk is the first dark 15-min block (the light here goes about 23 min before sunset)', () => {
    const withPar = run(START + 1.5 * 24 * H, undefined, true);
    const first = withPar.find((r) => r.station === 'flat')!;
    const dusk = Date.parse(first.t);
    expect(dusk).toBeLessThan(sets[0]!.tMs - 5 * 60_000);
    expect(dusk).toBeGreaterThan(sets[0]!.tMs - 40 * 60_000);
  });
});

describe('modelled flow for an ADCP gap', () => {
  it('the fitted power law reproduces the synthetic flow u = 0.03 H h^-0.5 within 1 %', () => {
    const s = createForecastState();
    for (let t = START; t < START + 2 * 24 * H; t += 10 * 60_000) {
      if (t % (30 * 60_000) === 0) {
        observeDepth(s, 'flat', t, reef.depthFlat(t));
        observeOffshoreWaves(s, t, reef.hm0(t));
      }
      observeCurrent(s, 'outer', t, reef.u(t), reef.depthFlat(t));
    }
    const t = START + 2 * 24 * H + 20 * 60_000;
    const m = modelledFlow(s, PLAN, 'outer', t, { hm0OffshoreM: 1.3, depthM: 1.1 });
    if (!m) throw new Error('no model');
    expect(Math.abs(m.uMS / (0.03 * 1.3 * 1.1 ** -0.5) - 1)).toBeLessThan(0.01);
    // 15-min means of the ensembles, with the 30-min offshore Hm0 interpolated to them.
    expect(Math.abs(m.model.b - 1)).toBeLessThan(0.05);
    expect(Math.abs(m.model.c + 0.5)).toBeLessThan(0.05);
    expect(modelledFlow(s, PLAN, 'nowhere', t)).toBeUndefined();
    const fromState = modelledFlow(s, PLAN, 'outer', t)!;
    expect(fromState.depthM).toBeCloseTo(reef.depthFlat(START + 2 * 24 * H - 30 * 60_000), 5); // blocks keep 1e-6
  });
});
