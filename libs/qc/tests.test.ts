import { describe, it, expect } from 'vitest';
import {
  attenuatedSignal,
  climatology,
  DEFAULT_QC_LIMITS,
  grossRange,
  rateOfChange,
  spike,
  timing,
  type QcFlag,
} from './index.js';

const TEMP = DEFAULT_QC_LIMITS.temp_c!;

describe('grossRange with the docs/methods/qc.md 7.3 temperature row', () => {
  it('fails outside the sensor range, is suspect outside the user range', () => {
    expect(grossRange(41, TEMP.sensor, TEMP.user)).toBe(4);
    expect(grossRange(-2.5, TEMP.sensor, TEMP.user)).toBe(4);
    expect(grossRange(37, TEMP.sensor, TEMP.user)).toBe(3);
    expect(grossRange(17.9, TEMP.sensor, TEMP.user)).toBe(3);
    expect(grossRange(27.3, TEMP.sensor, TEMP.user)).toBe(1);
    // Limits are inclusive (common practice): 36 is the user maximum itself.
    expect(grossRange(36, TEMP.sensor, TEMP.user)).toBe(1);
    expect(grossRange(Number.NaN, TEMP.sensor, TEMP.user)).toBe(9);
  });
  it('uses the pCO2 row: below 100 uatm suspect, above 3000 fail', () => {
    const p = DEFAULT_QC_LIMITS.pco2_uatm!;
    expect(grossRange(95, p.sensor, p.user)).toBe(3);
    expect(grossRange(3100, p.sensor, p.user)).toBe(4);
    expect(grossRange(420, p.sensor, p.user)).toBe(1);
  });
});

describe('climatology', () => {
  const monthly = Array.from({ length: 12 }, (_, m) => (m === 6 ? { min: 24, max: 28 } : null));
  const july = Date.UTC(2026, 6, 15);
  it('flags 3 outside the month envelope, 1 inside', () => {
    expect(climatology(29, july, { monthly, years: 2 })).toBe(3);
    expect(climatology(26, july, { monthly, years: 2 })).toBe(1);
  });
  it('is not evaluated with under a year of data or no envelope for the month', () => {
    expect(climatology(29, july, { monthly, years: 0.5 })).toBe(2);
    expect(climatology(29, Date.UTC(2026, 0, 15), { monthly, years: 2 })).toBe(2);
    expect(climatology(29, july, undefined)).toBe(2);
  });
});

describe('spike', () => {
  it('reproduces the documented example of the public R rtqc_spike function (wqptools docs)', () => {
    // Series and thresholds (0.15, 0.25) and the expected flags pass, pass, suspect, suspect, fail x5 for the
    // interior points are the example printed in that function's documentation.
    const x = [1, 1.1, 1, 1.2, 1, 1.3, 1, 1.4, 1, 1.5, 1];
    const got: QcFlag[] = [];
    for (let i = 1; i < x.length - 1; i++)
      got.push(spike(x[i - 1]!, x[i]!, x[i + 1]!, { suspect: 0.15, fail: 0.25 }));
    expect(got).toEqual([1, 1, 3, 3, 4, 4, 4, 4, 4]);
  });
  it('uses the 7.3 temperature limits 0.5 / 1.0 degC (hand-computed)', () => {
    const lim = TEMP.spike!;
    expect(spike(25, 25.6, 25, lim)).toBe(3); // |25.6 - 25| = 0.6
    expect(spike(25, 26.2, 25.2, lim)).toBe(4); // |26.2 - 25.1| = 1.1
    expect(spike(25, 25.4, 25.2, lim)).toBe(1); // 0.3
    expect(spike(25, 25.4, Number.NaN, lim)).toBe(2);
  });
});

describe('rateOfChange, attenuatedSignal, timing', () => {
  it('rate of change flags a step beyond 3 sd (hand-computed)', () => {
    expect(rateOfChange(25.0, 25.4, 0.1, 3)).toBe(3); // 0.4 > 0.3
    expect(rateOfChange(25.0, 25.25, 0.1, 3)).toBe(1);
    expect(rateOfChange(25.0, 25.25, 0.0, 3, 0.1)).toBe(1); // the sd floor applies
    expect(rateOfChange(25.0, 25.25, Number.NaN, 3)).toBe(2);
  });
  it('attenuated signal on a burst: sd below 0.002 m (docs/methods/qc.md 7.3) is suspect', () => {
    const lim = { windowMs: 1, measure: 'sd' as const, suspectBelow: 0.002, minSamples: 16 };
    const flat = Float64Array.from({ length: 64 }, (_, i) => 2.5 + (i % 2 === 0 ? 0.001 : -0.001)); // sd ~0.001
    const live = Float64Array.from({ length: 64 }, (_, i) => 2.5 + 0.3 * Math.sin(i / 3));
    expect(attenuatedSignal(flat, lim)).toBe(3);
    expect(attenuatedSignal(live, lim)).toBe(1);
    expect(attenuatedSignal(flat.subarray(0, 8), lim)).toBe(2);
    expect(attenuatedSignal(flat, { ...lim, failBelow: 0.0015 })).toBe(4);
  });
  it('timing fails a sample stamped over 1 min after its receive time (docs/methods/qc.md 7.2)', () => {
    expect(timing(1_000_000 + 61_000, 1_000_000)).toBe(4);
    expect(timing(1_000_000 + 59_000, 1_000_000)).toBe(1);
    expect(timing(1_000_000 - 3_600_000, 1_000_000)).toBe(1); // late delivery is not a clock fault
    expect(timing(1_000_000, undefined)).toBe(2);
  });
});
