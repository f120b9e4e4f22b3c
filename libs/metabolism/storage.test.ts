// The O2 storage term (storage.ts; docs/methods/metabolism.md 6.1) on a signal whose derivatives are known.
import { describe, expect, it } from 'vitest';
import { o2Storage } from './storage.js';
import type { StationWindowMean } from './types.js';

const st = (o2: number, sem = 0): StationWindowMean => ({
  tempC: 27,
  salinity: 35,
  o2UmolKg: o2,
  depthM: 1,
  flag: 1,
  semO2UmolKg: sem,
});
const W = 1800; // s
const pair = (c: number, sem = 0) => ({ up: st(c - 5, sem), down: st(c + 5, sem) });

describe('O2 storage term', () => {
  // C(t) = a t^2 (umol/kg, t in s): dC/dt at the window k (t = 0) is 0, whatever a.
  const a = 1e-6;
  const c = (t: number) => a * t * t;
  it('centred is exact for a quadratic, backward is off by a W/2 lag (algebra: -a W)', () => {
    const centred = o2Storage(pair(c(0)), pair(c(-W)), W, { pair: pair(c(W)), dtS: W });
    const backward = o2Storage(pair(c(0)), pair(c(-W)), W);
    expect(centred.form).toBe('centred');
    expect(centred.rate).toBeCloseTo(0, 15);
    expect(backward.form).toBe('backward');
    expect(backward.rate).toBeCloseTo(-a * W, 15);
  });
  it('sigma from the standard errors of the two means it differences', () => {
    const centred = o2Storage(pair(0, 2), pair(0, 1), W, { pair: pair(0, 3), dtS: W });
    // Cm = (A + B)/2: sem(Cm) = sem/sqrt(2) for equal station sems; centred uses prev (1) and next (3)
    expect(centred.sigma).toBeCloseTo(Math.hypot(3 / Math.SQRT2, 1 / Math.SQRT2) / (2 * W), 15);
    const backward = o2Storage(pair(0, 2), pair(0, 1), W);
    expect(backward.sigma).toBeCloseTo(Math.hypot(2 / Math.SQRT2, 1 / Math.SQRT2) / W, 15);
  });
  it('no previous window: no storage term', () => {
    expect(o2Storage(pair(1), undefined, W, { pair: pair(2), dtS: W })).toEqual({
      rate: 0,
      sigma: 0,
      form: 'none',
    });
  });
});
