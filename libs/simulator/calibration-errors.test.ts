// Calibration errors of simulated sensors and replicated runs of one reef (calibration-errors.ts, generate.ts).
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../contract/index.js';
import { drawCalibration, measuredCurrent, TYPICAL_ACCURACY } from './calibration-errors.js';
import { simulateMessages } from './generate.js';
import { createRng } from './prng.js';

const parsed = parseConfigText(`
site: cal-reef
reef_axis_deg: 270
stations:
  flat:
    sensors:
      ctd: { kind: ctd }
      co2: { kind: pco2 }
`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;
const opts = { startMs: Date.UTC(2026, 5, 10), durationMs: 6 * 3_600_000, seed: 5, faults: false };

const sd = (xs: number[]) => {
  const m = xs.reduce((a, x) => a + x, 0) / xs.length;
  return Math.sqrt(xs.reduce((a, x) => a + (x - m) ** 2, 0) / (xs.length - 1));
};

describe('calibration errors', () => {
  it('are drawn with the typical accuracies of docs/methods/uncertainty.md 9.3', () => {
    const root = createRng(1);
    const draws = (kind: string) =>
      Array.from({ length: 4000 }, (_, i) => drawCalibration(kind, root.fork(`${i}`)));
    // 4000 normal draws give the sd within 2.2 % (1 standard error: 1/sqrt(2 x 4000) = 1.1 %)
    expect(sd(draws('pco2').map((c) => c.gain)) / TYPICAL_ACCURACY.pco2Rel).toBeCloseTo(1, 1);
    expect(sd(draws('oxygen').map((c) => c.gain)) / TYPICAL_ACCURACY.o2Rel).toBeCloseTo(1, 1);
    const ctd = draws('ctd');
    expect(sd(ctd.map((c) => c.offset)) / TYPICAL_ACCURACY.tempC).toBeCloseTo(1, 1);
    expect(sd(ctd.map((c) => c.offset2)) / TYPICAL_ACCURACY.sal).toBeCloseTo(1, 1);
    expect(sd(draws('adcp').map((c) => c.headingDeg)) / TYPICAL_ACCURACY.headingDeg).toBeCloseTo(1, 1);
    expect(drawCalibration('par', root)).toEqual({ gain: 0, offset: 0, offset2: 0, headingDeg: 0 });
  });

  it('turn and scale an ADCP current: a 90-degree heading error reads a northward flow as eastward', () => {
    const [e, n] = measuredCurrent({ gain: 0.1, offset: 0.001, offset2: 0, headingDeg: 90 }, 0, 0.2);
    expect(e).toBeCloseTo(0.2 * 1.1 + 0.001, 12);
    expect(n).toBeCloseTo(0, 12);
  });

  it('shift a sensor for the whole run, and a noise seed replicates the reef with other noise', () => {
    const clean = simulateMessages(config, opts);
    const other = simulateMessages(config, { ...opts, noiseSeed: 9 });
    const biased = simulateMessages(config, { ...opts, noiseSeed: 9, calibrationErrors: true });
    // the same reef: the truth does not depend on the sensors
    expect(other.truth).toEqual(clean.truth);
    expect(biased.truth).toEqual(clean.truth);
    const pco2 = (r: typeof clean) =>
      r.messages.filter((m) => m.topic.endsWith('/pco2/co2')).map((m) => m.payload.pco2_uatm as number);
    const a = pco2(clean);
    const b = pco2(other);
    const c = pco2(biased);
    expect(b).not.toEqual(a);
    // the same noise with and without the calibration error: a constant ratio (the gain), up to rounding
    const ratios = c.map((x, i) => x / (b[i] as number));
    const g = ratios.reduce((s, x) => s + x, 0) / ratios.length;
    expect(Math.abs(g - 1)).toBeGreaterThan(1e-4);
    for (const r of ratios) expect(r).toBeCloseTo(g, 3);
    // unchanged without the options: the demo's and the digest's runs stay as they were
    expect(simulateMessages(config, opts).messages).toEqual(clean.messages);
  });
});
