import { describe, expect, it } from 'vitest';
import { createRng } from '../simulator/index.js';
import {
  decimalsOf,
  DEFAULT_NOISE_LIMITS,
  newNoiseProfile,
  noiseAdd,
  noiseAddRun,
  noiseScales,
} from './noise.js';
import { rateOfChangeFloor, spikeLimitsWithFloor } from './index.js';

/** White noise of sd `sd` around `level`, rounded to `dp` decimals, fed as one contiguous series. */
function profileOf(sd: number, dp: number, n: number, seed = 3, level = 400) {
  const rng = createRng(seed);
  const p = newNoiseProfile();
  const lim = { ...DEFAULT_NOISE_LIMITS, windowSamples: 100_000 }; // a plain mean: the check is exact
  let run = 0;
  let last: number | undefined;
  for (let i = 0; i < n; i++) {
    const v = Math.round((level + sd * rng.normal()) * 10 ** dp) / 10 ** dp;
    if (v === last) run++;
    else {
      if (last !== undefined) noiseAddRun(p, run, lim);
      run = 1;
    }
    last = v;
    noiseAdd(p, v, i > 0, lim);
  }
  return noiseScales(p, lim);
}

describe('noise profile (docs/methods/faults.md 12.1)', () => {
  it('reads the resolution from the decimals reported', () => {
    expect(decimalsOf(405.3)).toBe(1);
    expect(decimalsOf(26.1234)).toBe(4);
    expect(decimalsOf(12)).toBe(0);
    expect(decimalsOf(0.001)).toBe(3);
    expect(profileOf(1.5, 1, 200).resolution).toBeCloseTo(0.1, 12);
  });

  it('gives the Gaussian sd of steps and of the spike statistic (normal algebra, hand-computed)', () => {
    // Steps of white noise have sd s sqrt 2; V_n - (V_{n-1} + V_{n+1})/2 has sd s sqrt(1 + 1/4 + 1/4) = s sqrt 1.5.
    const s = profileOf(1.5, 1, 20_000);
    expect(s.stepSd! / (1.5 * Math.SQRT2)).toBeGreaterThan(0.97);
    expect(s.stepSd! / (1.5 * Math.SQRT2)).toBeLessThan(1.03);
    expect(s.spikeSd! / (1.5 * Math.sqrt(1.5))).toBeGreaterThan(0.97);
    expect(s.spikeSd! / (1.5 * Math.sqrt(1.5))).toBeLessThan(1.03);
  });

  it('knows how often a reading repeats: ~q / (sqrt(2 pi) s sqrt 2) for resolution q << noise', () => {
    // pCO2 with the simulator's 1.5-uatm noise at 0.1 uatm: 0.1 / (2.5066 x 2.1213) = 0.0188 (hand-computed).
    const s = profileOf(1.5, 1, 20_000);
    expect(s.repeatP!).toBeGreaterThan(0.016);
    expect(s.repeatP!).toBeLessThan(0.022);
    // A battery voltage with 0.01-V noise at 0.01 V repeats often: the repeat test will not judge it.
    expect(profileOf(0.01, 2, 5000, 4, 12.6).repeatP!).toBeGreaterThan(0.2);
  });

  it('is robust: one reading 100 sd off moves the step sd by under 6 %', () => {
    const rng = createRng(9);
    const lim = DEFAULT_NOISE_LIMITS;
    const a = newNoiseProfile();
    const b = newNoiseProfile();
    for (let i = 0; i <= 201; i++) {
      const v = 400 + 1.5 * rng.normal();
      noiseAdd(a, v, i > 0, lim);
      noiseAdd(b, i === 200 ? v + 150 : v, i > 0, lim);
    }
    const ratio = noiseScales(b, lim).stepSd! / noiseScales(a, lim).stepSd!;
    expect(ratio).toBeGreaterThan(1);
    // Right after it: each of its two steps is clipped at 5 x the running mean, (5 - 1) / 144 = +2.8 % each
    // (hand-computed; unclipped, two steps of 150 against a mean step of 1.69 would add 2 x 88 / 144 = +122 %).
    expect(ratio).toBeLessThan(1.06);
    expect(ratio).toBeGreaterThan(1.04);
  });

  it('learns a sensor that sat still at first (no clip against a zero mean)', () => {
    const p = newNoiseProfile();
    const rng = createRng(1);
    for (let i = 0; i < 20; i++) noiseAdd(p, 400, i > 0, DEFAULT_NOISE_LIMITS);
    for (let i = 0; i < 400; i++) noiseAdd(p, 400 + 1.5 * rng.normal(), true, DEFAULT_NOISE_LIMITS);
    const sd = noiseScales(p, DEFAULT_NOISE_LIMITS).stepSd!;
    expect(sd / (1.5 * Math.SQRT2)).toBeGreaterThan(0.85);
    expect(sd / (1.5 * Math.SQRT2)).toBeLessThan(1.15);
  });

  it('stays silent until minSamples differences were seen', () => {
    const p = newNoiseProfile();
    for (let i = 0; i < 10; i++) noiseAdd(p, 400 + i, i > 0, DEFAULT_NOISE_LIMITS);
    expect(noiseScales(p, DEFAULT_NOISE_LIMITS).stepSd).toBeNull();
  });
});

describe('noise floors (docs/methods/faults.md 12.2)', () => {
  it('raises spike limits to k x spike sd + resolution, never lowers them', () => {
    const lim = { suspect: 30, fail: 60 };
    expect(spikeLimitsWithFloor(lim, 1.8, 0.1)).toEqual({ suspect: 30, fail: 60 }); // 5 x 1.8 + 0.1 = 9.1 < 30
    expect(spikeLimitsWithFloor(lim, 8, 0.1)).toEqual({ suspect: 40.1, fail: 64.1 });
    expect(spikeLimitsWithFloor(lim, null, 0.1)).toBe(lim);
  });
  it('sets the rate-of-change sd floor so that nSd x floor = noiseK x step sd + resolution', () => {
    const r = { nSd: 3, windowMs: 1, minSamples: 1, minSd: 0.0005 };
    expect(rateOfChangeFloor(r, 0.0042, 0.0001)).toBeCloseTo((5 * 0.0042 + 0.0001) / 3, 12);
    expect(rateOfChangeFloor(r, null, 0.0001)).toBe(0.0005);
    expect(rateOfChangeFloor({ ...r, noiseK: 0 }, 0.0042, 0.0001)).toBe(0.0005);
  });
});
