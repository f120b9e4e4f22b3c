import { describe, expect, it } from 'vitest';
import { createRng } from '../simulator/index.js';
import { coLocatedDrift, DEFAULT_DRIFT_LIMITS, theilSen, type TimeSeries } from './index.js';

const MIN = 60_000;
const DAY = 86_400_000;
const T0 = Date.UTC(2026, 6, 1);

describe('Theil-Sen line', () => {
  it('ignores a wild point: y = 2x + 1 with one point off by 100 gives slope 2, intercept 1 (hand-computed)', () => {
    const x = [0, 1, 2, 3, 4, 5, 6, 7, 8];
    const y = x.map((v) => 2 * v + 1);
    y[4] = 109;
    const l = theilSen(x, y);
    expect(l.slope).toBe(2);
    expect(l.intercept).toBe(1);
  });
});

/** Two CTDs in the same water (a reef-flat day: 1.5 degC diurnal swing), noise 0.002 degC each, B drifting. */
function pair(days: number, driftPerDay: number, seed = 1): [TimeSeries, TimeSeries] {
  const rng = createRng(seed);
  const n = (days * DAY) / (5 * MIN);
  const t: number[] = [];
  const a: number[] = [];
  const b: number[] = [];
  for (let i = 0; i < n; i++) {
    const tMs = T0 + i * 5 * MIN;
    const water = 27 + 0.75 * Math.sin((2 * Math.PI * (tMs - T0)) / DAY);
    t.push(tMs);
    a.push(water + 0.002 * rng.normal());
    // B sits 2 s later (its own clock) with a 0.01-degC calibration offset and the drift.
    b.push(water + 0.01 + (driftPerDay * (tMs - T0)) / DAY + 0.002 * rng.normal());
  }
  return [
    { tMs: t, v: a },
    { tMs: t.map((x) => x + 2000), v: b },
  ];
}

describe('drift between co-located sensors (docs/methods/faults.md 12.4)', () => {
  const lim = DEFAULT_DRIFT_LIMITS.temp_c!;
  it('passes two healthy sensors with a constant offset, and reports the offset', () => {
    for (const seed of [1, 2, 3, 4, 5]) {
      const r = coLocatedDrift(...pair(3, 0, seed), lim);
      expect(r.flag).toBe(1);
      expect(r.offset).toBeCloseTo(0.01, 3);
      expect(Math.abs(r.change)).toBeLessThan(0.005);
    }
  });
  it('flags 3 for 0.01 degC/day over 3 days (0.03 > 0.02) and 4 for 0.03 degC/day (0.09 > 0.05)', () => {
    const s = coLocatedDrift(...pair(3, 0.01), lim);
    expect(s.flag).toBe(3);
    expect(s.slopePerDay).toBeCloseTo(0.01, 3);
    expect(s.change).toBeCloseTo(0.03, 2);
    expect(coLocatedDrift(...pair(3, 0.03), lim).flag).toBe(4);
    expect(coLocatedDrift(...pair(3, -0.03), lim).flag).toBe(4);
  });
  it('is not evaluated under a day of pairs, or when the samples never meet', () => {
    expect(coLocatedDrift(...pair(0.5, 0.1), lim).flag).toBe(2);
    const [a, b] = pair(3, 0.1);
    // B samples half-way between A's (2.5 min off) and pairs are allowed 1 min apart.
    const far = { tMs: Array.from(b.tMs, (x) => x + 2.5 * MIN - 2000), v: b.v };
    const r = coLocatedDrift(a, far, { ...lim, maxPairGapMs: MIN });
    expect(r.flag).toBe(2);
    expect(r.pairs).toBe(0);
  });
  it('is not fooled by a burst of spikes on one sensor', () => {
    const [a, b] = pair(3, 0);
    const v = Array.from(b.v);
    for (let i = 300; i < 330; i++) v[i] = v[i]! + 1.5;
    expect(coLocatedDrift(a, { tMs: b.tMs, v }, lim).flag).toBe(1);
  });
});
