// The depth an ADCP ensemble uses and the logger-ADCP comparison (adcp-depth.ts), on a tide written into the
// station series as the pressure and ADCP kinds write them.
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../../contract/index.js';
import { makeContext } from '../derive.js';
import { insert } from '../series.js';
import { createState } from '../state.js';
import { depthDifferenceM, loggerDepthAt } from './adcp-depth.js';

const parsed = parseConfigText(`
site: depth-reef
reef_axis_deg: 270
stations:
  back:
    sensors:
      p1: { kind: pressure, height_m: 0.2 }
      adcp: { kind: adcp, height_m: 0.3, beam_angle_deg: 25 }
`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;
const MIN = 60_000;
const T0 = Date.UTC(2026, 2, 1);
// An M2 tide of 0.5 m amplitude around 1.5 m: the steepest spring tide of the demo reef, 4.2 cm per 10 min.
const OMEGA = (2 * Math.PI) / (12.42 * 3_600_000);
const tide = (tMs: number) => 1.5 + 0.5 * Math.sin(OMEGA * (tMs - T0));
// Bursts every 30 min, 17 min long (2 Hz x 1024 samples): centre 8.5 min after the start.
const BURST_MS = 17 * MIN;

/** A station whose logger wrote bursts starting every 30 min up to `untilMs`, and an ADCP every 10 min. */
function station(untilMs: number, adcpOffsetM = 0) {
  const state = createState(['back']);
  const st = state.stations.back!;
  for (let s = T0; s + BURST_MS <= untilMs; s += 30 * MIN) {
    const c = s + BURST_MS / 2;
    // The burst mean is the tide averaged over the burst; at these lengths the centre value to 1e-4 m.
    insert(st.depthDone, s + BURST_MS, tide(c), 1);
    insert(st.burstCentre, s + BURST_MS, c, 1);
  }
  for (let t = T0; t < untilMs; t += 10 * MIN) insert(st.adcpDepth, t, tide(t) + adcpOffsetM, 1);
  const ctx = makeContext(config, state);
  ctx.asOfMs = untilMs;
  return ctx;
}

describe('the logger depth at an ensemble time', () => {
  it('follows the tide between bursts within 5 cm where the last burst alone is up to 15 cm off', () => {
    let worstLine = 0;
    let worstLast = 0;
    for (let t = T0 + 80 * MIN; t < T0 + 13 * 60 * MIN; t += 10 * MIN) {
      const ctx = station(t);
      const d = loggerDepthAt(ctx, 'back', t);
      expect(d).toBeDefined();
      worstLine = Math.max(worstLine, Math.abs(d!.depthM - tide(t)));
      // The previous rule: the last finished burst as it is.
      const st = ctx.state.stations.back!;
      const last = st.depthDone.v[st.depthDone.v.length - 1]!;
      worstLast = Math.max(worstLast, Math.abs(last - tide(t)));
    }
    // Algebra: |h''| (t - c_k)(t - c_k-1) / 2 <= 0.5 x 0.5 w^2 x 38.5 x 68.5 min^2 = 0.047 m; the hold error
    // is up to a w x 38.5 min = 0.16 m.
    expect(worstLine).toBeLessThan(0.05);
    expect(worstLast).toBeGreaterThan(0.12);
  });

  it('takes the last burst alone when it has no neighbour, and nothing after an hour of silence', () => {
    const ctx = station(T0 + 20 * MIN);
    expect(loggerDepthAt(ctx, 'back', T0 + 20 * MIN)?.depthM).toBeCloseTo(tide(T0 + 8.5 * MIN), 10);
    ctx.asOfMs = T0 + 20 * MIN + 2 * 60 * MIN;
    expect(loggerDepthAt(ctx, 'back', ctx.asOfMs)).toBeUndefined();
  });

  it('never reads a burst that finished after the ensemble', () => {
    const ctx = station(T0 + 3 * 60 * MIN);
    const t = T0 + 50 * MIN; // bursts finished by then: the ones starting at 0 and 30 min
    ctx.asOfMs = t;
    const d = loggerDepthAt(ctx, 'back', t)!;
    const c0 = T0 + 8.5 * MIN;
    const c1 = T0 + 38.5 * MIN;
    const expected = tide(c0) + ((tide(c1) - tide(c0)) * (t - c0)) / (c1 - c0);
    expect(d.depthM).toBeCloseTo(expected, 12);
  });
});

describe('the logger-ADCP depth comparison', () => {
  it('finds healthy sensors within a few mm at every time of the tide', () => {
    for (let t = T0 + 80 * MIN; t < T0 + 13 * 60 * MIN; t += 10 * MIN) {
      const d = depthDifferenceM(station(t), 'back', t);
      expect(d).toBeDefined();
      // Interpolation between centres 30 min apart: |h''| x 15^2 min^2 / 2 = 0.4 cm at most.
      expect(Math.abs(d!)).toBeLessThan(0.005);
    }
  });

  it('finds an ADCP whose height is set 8 cm wrong, whatever the tide does', () => {
    for (let t = T0 + 80 * MIN; t < T0 + 13 * 60 * MIN; t += 10 * MIN) {
      expect(depthDifferenceM(station(t, 0.08), 'back', t)!).toBeCloseTo(0.08, 2);
    }
  });

  it('says nothing without two finished bursts', () => {
    expect(depthDifferenceM(station(T0 + 20 * MIN), 'back', T0 + 20 * MIN)).toBeUndefined();
  });
});
