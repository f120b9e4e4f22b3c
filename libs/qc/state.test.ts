import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { createQcState, qcFlush, qcUpdate, type QcConfig } from './index.js';
import { binnedAdd, binnedSize, binnedSummary, createBinnedStats } from './binned-stats.js';

const MIN = 60_000;
const T0 = Date.UTC(2026, 6, 1);

/** A variable with only the tests a case needs (no defaults behind it). */
const only = (extra: Partial<QcConfig>): QcConfig => ({
  variable: 'x_test',
  sensor: { min: 0, max: 100 },
  user: { min: 10, max: 90 },
  maxGapMs: 30 * MIN,
  ...extra,
});

describe('qcUpdate: spike is provisional until the next value', () => {
  it('returns the final flag of V_n when V_{n+1} arrives (hand-made series, 7.3 temperature limits)', () => {
    const s = createQcState({
      variable: 'temp_c',
      rateOfChange: { nSd: 3, windowMs: 1, minSamples: 1e9, minSd: 0 },
    });
    const series = [25.0, 25.1, 26.3, 25.2, 25.3];
    const out = series.map((v, i) => qcUpdate(s, T0 + i * 10 * MIN, v));
    // 26.3 itself looks fine on its own (gross range 1), so its provisional flag is 1 with spike 2 ...
    expect(out[2]!.flag).toBe(1);
    expect(out[2]!.tests.spike).toBe(2);
    // ... and 25.2 closes it: |26.3 - (25.1 + 25.2)/2| = 1.15 > 1.0 -> 4.
    expect(out[3]!.finalizedPrevious).toEqual({
      tMs: T0 + 20 * MIN,
      flag: 4,
      tests: expect.objectContaining({ spike: 4 }),
    });
    // V_1 = 25.1 between 25.0 and 26.3: |25.1 - 25.65| = 0.55 > 0.5 -> suspect (the neighbour of a spike).
    expect(out[2]!.finalizedPrevious?.flag).toBe(3);
    // V_3 = 25.2 between 26.3 and 25.3: |25.2 - 25.8| = 0.6 -> 3.
    expect(out[4]!.finalizedPrevious?.flag).toBe(3);
    // The first sample has no left neighbour: spike not evaluated, final flag from the other tests (1).
    expect(out[1]!.finalizedPrevious).toEqual({
      tMs: T0,
      flag: 1,
      tests: expect.objectContaining({ spike: 2 }),
    });
    expect(qcFlush(s)).toEqual({ tMs: T0 + 40 * MIN, flag: 1, tests: expect.objectContaining({ spike: 2 }) });
    expect(qcFlush(s)).toBeUndefined();
  });

  it('does not use a neighbour across a gap or a failed value', () => {
    const s = createQcState(only({ spike: { suspect: 1, fail: 2 } }));
    qcUpdate(s, T0, 50);
    qcUpdate(s, T0 + MIN, 60);
    // 40 min gap > maxGapMs: V_1 = 60 cannot be judged against V_2.
    const r = qcUpdate(s, T0 + 41 * MIN, 50);
    expect(r.finalizedPrevious?.tests.spike).toBe(2);
    const s2 = createQcState(only({ spike: { suspect: 1, fail: 2 } }));
    qcUpdate(s2, T0, 50);
    qcUpdate(s2, T0 + MIN, 60);
    const bad = qcUpdate(s2, T0 + 2 * MIN, 150); // gross range fail
    expect(bad.flag).toBe(4);
    expect(bad.finalizedPrevious?.tests.spike).toBe(2); // 150 is no neighbour for 60 ...
    expect(qcUpdate(s2, T0 + 3 * MIN, 50).finalizedPrevious).toEqual({
      tMs: T0 + 2 * MIN,
      flag: 4, // ... and 150 keeps its gross-range fail, its spike test not evaluated
      tests: expect.objectContaining({ gross_range: 4, spike: 2 }),
    });
  });

  it('drops duplicates and out-of-order samples without touching the state, flags missing as 9', () => {
    const s = createQcState(only({}));
    qcUpdate(s, T0 + MIN, 50);
    expect(qcUpdate(s, T0 + MIN, 51).dropped).toBe('duplicate');
    expect(qcUpdate(s, T0, 51).dropped).toBe('out_of_order');
    expect(s.lastMs).toBe(T0 + MIN);
    const m = qcUpdate(s, T0 + 2 * MIN, Number.NaN);
    expect(m.flag).toBe(9);
    expect(qcUpdate(s, T0 + 3 * MIN, 50).finalizedPrevious).toEqual({
      tMs: T0 + 2 * MIN,
      flag: 9,
      tests: {},
    });
  });
});

describe('qcUpdate: rate of change, flat line, attenuated signal, timing', () => {
  it('rate of change flags a step beyond 3 sd of the previous window (hand-computed)', () => {
    // noiseK 0: the QARTOD rule alone (the noise floor has its own test in noise.test.ts).
    const s = createQcState(
      only({ rateOfChange: { nSd: 3, windowMs: 25 * 60 * MIN, minSamples: 24, minSd: 0, noiseK: 0 } }),
    );
    let t = T0;
    for (let i = 0; i < 30; i++) {
      const r = qcUpdate(s, (t += 10 * MIN), i % 2 === 0 ? 25.0 : 25.1);
      if (i < 24) expect(r.tests.rate_of_change).toBe(2); // too few samples for an sd
    }
    // 30 alternating samples: sd = 0.05 * sqrt(30/29) = 0.05085; 3 sd = 0.1526. Last value was 25.1.
    expect(qcUpdate(s, (t += 10 * MIN), 25.2).tests.rate_of_change).toBe(1); // step 0.1
    expect(qcUpdate(s, (t += 10 * MIN), 25.4).tests.rate_of_change).toBe(3); // step 0.2
  });

  it('flat line: 7.3 temperature eps 0.0005, suspect after 2 h, fail after 4 h, pass on change', () => {
    const s = createQcState({ variable: 'temp_c' });
    const flags: Record<number, number | undefined> = {};
    for (let m = 0; m <= 250; m += 10) flags[m] = qcUpdate(s, T0 + m * MIN, 26.1234).tests.flat_line;
    expect(flags[110]).toBe(2); // under 2 h of data
    expect(flags[120]).toBe(3);
    expect(flags[230]).toBe(3);
    expect(flags[240]).toBe(4);
    expect(qcUpdate(s, T0 + 260 * MIN, 26.1244).tests.flat_line).toBe(1); // 0.001 > eps
    expect(qcUpdate(s, T0 + 270 * MIN, 26.124).tests.flat_line).toBe(1); // 26.1234 is still in the last 2 h
  });

  it('attenuated signal over a time window', () => {
    const s = createQcState(
      only({
        attenuated: {
          windowMs: 60 * MIN,
          measure: 'range',
          suspectBelow: 0.5,
          failBelow: 0.1,
          minSamples: 6,
        },
      }),
    );
    let r;
    for (let m = 0; m <= 60; m += 5) r = qcUpdate(s, T0 + m * MIN, 50 + (m % 10 === 0 ? 0.02 : 0));
    expect(r!.tests.attenuated_signal).toBe(4); // range 0.02
    for (let m = 65; m <= 125; m += 5) r = qcUpdate(s, T0 + m * MIN, 50 + (m % 10 === 0 ? 0.3 : 0));
    expect(r!.tests.attenuated_signal).toBe(3); // range 0.3
    for (let m = 130; m <= 190; m += 5) r = qcUpdate(s, T0 + m * MIN, 50 + (m % 10 === 0 ? 2 : 0));
    expect(r!.tests.attenuated_signal).toBe(1);
  });

  it('timing: a sample over 1 min ahead of its receive time fails and is kept out of the windows', () => {
    const s = createQcState(only({}));
    const r = qcUpdate(s, T0 + 5 * MIN, 50, T0);
    expect(r.tests.timing).toBe(4);
    expect(r.flag).toBe(4);
    expect(qcUpdate(s, T0 + 6 * MIN, 50, T0 + 6 * MIN + 2000).flag).toBe(1);
  });

  it('ADCP tilt through gross range: 3 above 10 deg, 4 above 20 deg (docs/methods/currents.md 5.4)', () => {
    const s = createQcState('tilt_deg');
    expect(qcUpdate(s, T0, 4.2).flag).toBe(1);
    expect(qcUpdate(s, T0 + MIN, 12).flag).toBe(3);
    expect(qcUpdate(s, T0 + 2 * MIN, 87).flag).toBe(4); // the frame lies on its side
  });

  it('unknown variables need explicit limits', () => {
    expect(() => createQcState('no_such_var')).toThrow(/REEFD_QC_UNKNOWN_VARIABLE/);
  });
});

describe('restart', () => {
  it('a JSON round trip of the state mid-series gives the same flags as an uninterrupted run (property)', () => {
    fc.assert(
      fc.property(
        fc.array(
          fc.oneof(fc.double({ min: 24, max: 30, noNaN: true }), fc.constant(Number.NaN), fc.constant(27)),
          {
            minLength: 2,
            maxLength: 120,
          },
        ),
        fc.nat(),
        (xs, cut) => {
          const k = cut % xs.length;
          const times = xs.map((_, i) => T0 + i * 10 * MIN + (i % 7 === 3 ? 40 * MIN : 0));
          const a = createQcState('temp_c');
          const whole = xs.map((v, i) => qcUpdate(a, times[i]!, v));
          let b = createQcState('temp_c');
          const parts = xs.map((v, i) => {
            if (i === k) b = JSON.parse(JSON.stringify(b)) as typeof b;
            return qcUpdate(b, times[i]!, v);
          });
          expect(parts).toEqual(whole);
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('bounded memory', () => {
  it('keeps bounded windows whatever the sample rate (1 Hz for 2 days)', () => {
    const s = createQcState({ variable: 'temp_c' });
    for (let i = 0; i < 172_800; i++) qcUpdate(s, T0 + i * 1000, 26 + 0.01 * Math.sin(i / 600));
    // 25 one-hour bins of the 25-h window plus the one being filled; 32 bins of T_f = 4 h plus one.
    expect(binnedSize(s.roc!)).toBe(26);
    expect(binnedSize(s.flat!)).toBe(33);
  });

  it('holds only the bins that hold samples (issue 17: state sized to its use)', () => {
    // A pCO2 sensor at 10 min: T_f = 6 h in 32 bins of 11.25 min, so at most one sample per bin.
    const s = createQcState('pco2_uatm');
    for (let i = 0; i < 300; i++) qcUpdate(s, T0 + i * 10 * MIN, 400 + 10 * Math.sin(i / 7) + (i % 3) * 0.7);
    expect(binnedSize(s.flat!)).toBeLessThanOrEqual(33);
    expect(binnedSize(s.flat!)).toBeGreaterThanOrEqual(30);
    // A battery voltage has only gross range and stuck-at: no windows and no noise profile at all.
    const b = createQcState('battery_v');
    for (let i = 0; i < 50; i++) qcUpdate(b, T0 + i * 10 * MIN, 12.5);
    expect([b.roc, b.flat, b.att, b.noise]).toEqual([null, null, null, null]);
    // Stored window numbers of a station's temp, sal, O2 and pCO2 states at 5 min after two days: 1,180 (the
    // earlier layout preallocated 4,648 for the same four: 101 x 7 + 65 x 7 per variable, issue 17).
    const vars = ['temp_c', 'sal', 'o2_umol_kg', 'pco2_uatm'].map((v) => createQcState(v));
    for (let i = 0; i < 576; i++) for (const q of vars) qcUpdate(q, T0 + i * 5 * MIN, 30 + Math.sin(i / 20));
    const stored = vars.reduce((a, q) => a + q.roc!.b.length + q.flat!.b.length, 0);
    expect(stored).toBeLessThanOrEqual(1180);
  });

  it('binned window statistics equal direct two-pass statistics (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 2, maxLength: 300 }),
        (xs) => {
          const b = createBinnedStats(1e6, 16, 'moments');
          const x = createBinnedStats(1e6, 16, 'extremes');
          xs.forEach((v, i) => {
            binnedAdd(b, i * 1000, v);
            binnedAdd(x, i * 1000, v);
          });
          const w = binnedSummary(b, 0, xs.length * 1000);
          const e = binnedSummary(x, 0, xs.length * 1000);
          const mean = xs.reduce((a, x) => a + x, 0) / xs.length;
          const sd = Math.sqrt(xs.reduce((a, x) => a + (x - mean) ** 2, 0) / (xs.length - 1));
          expect(w.n).toBe(xs.length);
          expect(w.mean).toBeCloseTo(mean, 8);
          expect(Math.abs(w.sd - sd)).toBeLessThan(1e-7 * (1 + sd));
          expect(e.n).toBe(xs.length);
          expect(e.min).toBe(Math.min(...xs));
          expect(e.max).toBe(Math.max(...xs));
        },
      ),
    );
  });
});
