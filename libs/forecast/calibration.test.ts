import { describe, expect, it } from 'vitest';
import { seeded } from '../daily/test-helpers.js';
import { calibration, nightsOf, studentT90 } from './calibration.js';
import type { ForecastError } from './state.js';

const O = { defaultModelSigmaMgL: 0.25, minCalibration: 3 };
const rows = (errs: number[], half = 0, lead = 0): ForecastError[] =>
  errs.map((e, i) => ({ issueMs: i * 86_400_000, lead, errMgL: e, halfLoMgL: half, halfHiMgL: half }));

describe('calibration of a station from its scored nights', () => {
  it("Student's t 0.9 quantile: 1.3830 at 9 and 1.3104 at 30 degrees of freedom (scipy.stats.t.ppf)", () => {
    expect(studentT90(9)).toBeCloseTo(1.383029, 4);
    expect(studentT90(30)).toBeCloseTo(1.310415, 5);
    expect(studentT90(0)).toBe(Infinity);
  });

  it('before three nights: no bias and the default model error', () => {
    expect(calibration(rows([0.4, 0.5]), 0, O)).toEqual({ bias: 0, sigma: 0.25, widen: 1, ensembleScale: 1 });
    // Eleven hourly forecasts of one night (an event night, 4.7 mg/L below them all) are one night, not eleven.
    const oneNight: ForecastError[] = Array.from({ length: 11 }, (_, lead) => ({
      issueMs: 86_400_000 + lead * 3_600_000,
      lead,
      errMgL: -4.7,
      halfLoMgL: 0.3,
      halfHiMgL: 0.3,
    }));
    expect(calibration(oneNight, 0, O)).toEqual({ bias: 0, sigma: 0.25, widen: 1, ensembleScale: 1 });
  });

  it('counts nights by their dusks, whatever the hour of dusk in UTC', () => {
    // Dusks at 11:50 and 12:10 UTC on consecutive days (a calendar-day key rounded at noon would merge or split
    // them), each night with hourly forecasts issued up to 20 minutes off the hour.
    const D = 86_400_000;
    const H = 3_600_000;
    const night = (duskMs: number): ForecastError[] =>
      Array.from({ length: 10 }, (_, lead) => ({
        issueMs: duskMs + lead * H + (lead % 2 ? 20 : -20) * 60_000,
        lead,
        errMgL: 0,
        halfLoMgL: 0,
        halfHiMgL: 0,
      }));
    expect(nightsOf(night(11.8 * H))).toBe(1);
    expect(nightsOf([...night(11.8 * H), ...night(D + 12.2 * H)])).toBe(2);
    expect(nightsOf([...night(12.2 * H), ...night(D + 11.8 * H), ...night(2 * D + 12 * H)])).toBe(3);
    expect(nightsOf([])).toBe(0);
  });

  it('a steady bias is removed; the error spread the members miss becomes the model error', () => {
    const r = seeded(3);
    const errs = Array.from({ length: 14 }, () => 0.3 + 0.2 * r.normal());
    const c = calibration(rows(errs), 0, O);
    expect(Math.abs(c.bias - 0.3)).toBeLessThan(0.12);
    expect(c.sigma).toBeGreaterThan(0.12);
    expect(c.sigma).toBeLessThan(0.3);
    expect(c.widen).toBeCloseTo((studentT90(13) / 1.2815515655446004) * Math.sqrt(1 + 1 / 14), 12);
  });

  it('members wider than the errors are narrowed (shrunk towards 1), with no model error added', () => {
    const c = calibration(rows([0.05, -0.05, 0.02, -0.02, 0.04, -0.04], 1.0), 0, O);
    expect(c.sigma).toBe(0);
    expect(c.ensembleScale).toBeLessThan(0.75);
    expect(c.ensembleScale).toBeGreaterThan(0.5);
  });

  it('uses the same hours after dusk when it can, and leaves out a night far off the others', () => {
    const mixed = [...rows([0.1, 0.1, 0.1], 0, 0), ...rows([-0.4, -0.4, -0.4, -0.4], 0, 5)];
    // The median error of n nights, shrunk towards zero with a prior weight of three nights.
    expect(calibration(mixed, 0, O).bias).toBeCloseTo((0.1 * 3) / 6, 12);
    expect(calibration(mixed, 5, O).bias).toBeCloseTo((-0.4 * 4) / 7, 12);
    const withEvent = rows([0.05, -0.03, 0.02, -0.04, 0.01, -4.5]);
    const c = calibration(withEvent, 0, O);
    expect(Math.abs(c.bias)).toBeLessThan(0.05);
    expect(c.sigma).toBeLessThan(0.1);
  });
});
