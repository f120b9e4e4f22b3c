import { describe, expect, it } from 'vitest';
import { O2_MG_L_PER_MMOL_M3, type BoxModel } from './box-model.js';
import type { FlowModel } from './flow-model.js';
import { forecastNight, type StationModel } from './night.js';

/** A flow model that returns a fixed velocity (ln u = ln u0, no terms, no scatter unless given). */
const fixedFlow = (uMS: number, residualSdLn = 0): FlowModel => ({
  ok: true,
  a: Math.log(uMS),
  b: 0,
  c: 0,
  cov: new Array(9).fill(0),
  residualSdLn,
  n: 100,
  terms: { wave: false, depth: false },
  hm0RangeM: [1, 1],
  depthRangeM: [1, 1],
  fittedAtMs: 0,
});
const T0 = Date.UTC(2026, 5, 10, 4);
const END = T0 + 11 * 3.6e6;

describe('tonight: the transect model', () => {
  it('downstream = upstream - R L/(u_c h_c) in mg/L: 19 mmol m-2 h-1, 180 m at 5 cm/s over 1.2 m (analytic)', () => {
    const models: StationModel[] = [
      { kind: 'persistence', station: 'crest', o2NowMgL: 6.3, sigmaMgL: 0 },
      {
        kind: 'transect',
        station: 'flat',
        upstream: 'crest',
        lengthM: 180,
        rMmolM2H: 19,
        rSigmaMmolM2H: 0,
        flow: { flow: fixedFlow(0.05), currentDepthM: () => 1.2 },
        offsetMgL: 0.02,
      },
    ];
    const f = forecastNight(models, { issueMs: T0, endMs: END, hm0OffshoreM: 1, hm0LnSigma: 0 });
    const tauH = 180 / 0.05 / 3600;
    const expected = 6.3 - (19 * O2_MG_L_PER_MMOL_M3 * tauH) / 1.2 + 0.02;
    const flat = f.find((x) => x.station === 'flat')!;
    expect(flat.o2MinMgL).toBeCloseTo(expected, 12);
    // 19 mmol m-2 h-1 over one hour and 1.2 m: about half a mg/L (common sense check of the units).
    expect(6.3 - expected + 0.02).toBeCloseTo(0.507, 3);
    expect(flat.loMgL).toBeCloseTo(expected, 12);
    expect(flat.hiMgL).toBeCloseTo(expected, 12);
    expect(flat.horizonH).toBeCloseTo(11, 12);
  });

  it('the minimum comes at low tide, when the shallow flat holds the transit longest', () => {
    const lowTide = T0 + 5 * 3.6e6;
    const depth = (t: number) =>
      1.2 + 0.4 * Math.cos((2 * Math.PI * (t - lowTide)) / (12.42 * 3.6e6) + Math.PI);
    const models: StationModel[] = [
      { kind: 'persistence', station: 'up', o2NowMgL: 6, sigmaMgL: 0 },
      {
        kind: 'transect',
        station: 'down',
        upstream: 'up',
        lengthM: 200,
        rMmolM2H: 20,
        rSigmaMmolM2H: 0,
        flow: { flow: fixedFlow(0.06), currentDepthM: depth },
        offsetMgL: 0,
      },
    ];
    const f = forecastNight(models, { issueMs: T0, endMs: END, hm0OffshoreM: 1, hm0LnSigma: 0 });
    expect(Math.abs(f[1]!.tMinMs - lowTide)).toBeLessThanOrEqual(5 * 60_000);
    expect(f[1]!.o2MinMgL).toBeCloseTo(6 - (20 * O2_MG_L_PER_MMOL_M3 * (200 / 0.06 / 3600)) / 0.8, 3);
  });

  it('uncertain respiration and flow give an interval around the centre that widens with them', () => {
    const build = (rSigma: number, flowSd: number): StationModel[] => [
      { kind: 'persistence', station: 'up', o2NowMgL: 6, sigmaMgL: 0.05 },
      {
        kind: 'transect',
        station: 'down',
        upstream: 'up',
        lengthM: 180,
        rMmolM2H: 19,
        rSigmaMmolM2H: rSigma,
        flow: { flow: fixedFlow(0.05, flowSd), currentDepthM: () => 1.2 },
        offsetMgL: 0,
      },
    ];
    const narrow = forecastNight(build(1, 0.1), {
      issueMs: T0,
      endMs: END,
      hm0OffshoreM: 1,
      hm0LnSigma: 0.1,
    })[1]!;
    const wide = forecastNight(build(4, 0.4), {
      issueMs: T0,
      endMs: END,
      hm0OffshoreM: 1,
      hm0LnSigma: 0.1,
    })[1]!;
    expect(narrow.loMgL).toBeLessThan(narrow.o2MinMgL);
    expect(narrow.hiMgL).toBeGreaterThan(narrow.o2MinMgL);
    expect(wide.hiMgL - wide.loMgL).toBeGreaterThan(2 * (narrow.hiMgL - narrow.loMgL));
    // The same inputs give the same forecast (no random numbers).
    expect(
      forecastNight(build(4, 0.4), { issueMs: T0, endMs: END, hm0OffshoreM: 1, hm0LnSigma: 0.1 })[1],
    ).toEqual(wide);
  });

  it('refuses a station whose upstream is not forecast before it', () => {
    const models: StationModel[] = [
      {
        kind: 'transect',
        station: 'down',
        upstream: 'up',
        lengthM: 180,
        rMmolM2H: 19,
        rSigmaMmolM2H: 0,
        flow: { flow: fixedFlow(0.05), currentDepthM: () => 1 },
        offsetMgL: 0,
      },
    ];
    expect(() => forecastNight(models, { issueMs: T0, endMs: END, hm0OffshoreM: 1, hm0LnSigma: 0 })).toThrow(
      /upstream up is not forecast before it/,
    );
  });
});

describe('tonight: the one-box lagoon', () => {
  it('relaxes towards its source less R/(k h): the equilibrium of the budget (analytic)', () => {
    const box: BoxModel = {
      ok: true,
      kappa: 0.5,
      rMmolM2H: 14,
      cov: [0, 0, 0, 0],
      residualSdMgLH: 0,
      n: 100,
    };
    const models: StationModel[] = [
      { kind: 'persistence', station: 'back', o2NowMgL: 5.8, sigmaMgL: 0 },
      { kind: 'box', station: 'lagoon', source: 'back', o2NowMgL: 6.5, box, depthM: () => 3.6 },
    ];
    // Driver 1: k = 0.5 per hour; 11 h is 5.5 e-folding times.
    const f = forecastNight(models, { issueMs: T0, endMs: END, hm0OffshoreM: 1, hm0LnSigma: 0, stepMin: 5 });
    const eq = 5.8 - (14 * O2_MG_L_PER_MMOL_M3) / 3.6 / 0.5;
    const lagoon = f[1]!;
    expect(lagoon.o2MinMgL).toBeCloseTo(eq + (6.5 - eq) * Math.exp(-0.5 * 11), 6);
    expect(lagoon.tMinMs).toBe(END);
  });

  it('a demand found rising tonight grows for rGrowthForH hours, then holds (analytic, no exchange)', () => {
    const box: BoxModel = { ok: true, kappa: 0, rMmolM2H: 14, cov: [0, 0, 0, 0], residualSdMgLH: 0, n: 100 };
    const models = (growth: number): StationModel[] => [
      { kind: 'persistence', station: 'back', o2NowMgL: 5.8, sigmaMgL: 0 },
      {
        kind: 'box',
        station: 'lagoon',
        source: 'back',
        o2NowMgL: 6.5,
        box,
        depthM: () => 3.6,
        rGrowthMmolM2H2: growth,
        rGrowthForH: 1,
      },
    ];
    const run = (g: number) =>
      forecastNight(models(g), { issueMs: T0, endMs: END, hm0OffshoreM: 1, hm0LnSigma: 0, stepMin: 5 })[1]!;
    // O(end) = O0 - c/h [R 11 h + g (0.5 h^2 + 10 h^2)]: the ramp's first hour, then 10 h at R + g.
    const c = O2_MG_L_PER_MMOL_M3 / 3.6;
    expect(run(0).o2MinMgL).toBeCloseTo(6.5 - c * 14 * 11, 9);
    expect(run(20).o2MinMgL).toBeCloseTo(6.5 - c * (14 * 11 + 20 * 10.5), 9);
  });
});
