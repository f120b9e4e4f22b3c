import { describe, expect, it } from 'vitest';
import { seeded } from '../daily/test-helpers.js';
import { calibration, studentT90 } from './calibration.js';
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
    expect(calibration(mixed, 0, O).bias).toBeCloseTo(0.1, 12);
    expect(calibration(mixed, 5, O).bias).toBeCloseTo(-0.4, 12);
    const withEvent = rows([0.05, -0.03, 0.02, -0.04, 0.01, -4.5]);
    const c = calibration(withEvent, 0, O);
    expect(Math.abs(c.bias)).toBeLessThan(0.05);
    expect(c.sigma).toBeLessThan(0.1);
  });
});
