import { describe, expect, it } from 'vitest';
import { closeDay, type DailyOptions } from './close-day.js';
import { createLocalCalendar } from './local-day.js';
import type { FluxWindowInput } from './slots.js';
import { solarElevationDeg } from './sun.js';
import { mean, sd, seeded } from './test-helpers.js';

const LAT = 8;
const LON = -145;
const cal = createLocalCalendar('Etc/GMT+10');
const par = (t: number) => {
  const e = solarElevationDeg(t, LAT, LON);
  return e <= 0 ? 0 : 2200 * Math.sin((e * Math.PI) / 180) ** 1.2;
};
const ncpOf = (I: number) => 58 * Math.tanh(I / 380) - 19;
const necOf = (I: number) => 9 * Math.tanh(I / 300) + 2;
const OPTS: DailyOptions = { cadenceMin: 10, windowMin: 10, sun: { latDeg: LAT, lonDeg: LON } };

interface Day {
  windows: FluxWindowInput[];
  truth: { ncp: number; gpp: number; r: number; nec: number; necDay: number; necNight: number };
}

/** One synthetic day on the 10-min grid: exact rates plus noise; invalid where drop(t, I) says. */
function makeDay(
  day: string,
  noise: { ncp: number; nec: number; seed: number },
  drop: (t: number, I: number) => boolean = () => false,
  cadenceMin = 10,
): Day {
  const b = cal.dayBounds(day);
  const r = seeded(noise.seed);
  const step = cadenceMin * 60_000;
  const windows: FluxWindowInput[] = [];
  const truth = { ncp: 0, gpp: 0, r: 0, nec: 0, necDay: 0, necNight: 0 };
  for (let t = b.startMs + step / 2; t < b.endMs; t += step) {
    const I = par(t);
    const h = cadenceMin / 60;
    truth.ncp += ncpOf(I) * h;
    truth.r += 19 * h;
    truth.nec += necOf(I) * h;
    if (I < 1) truth.necNight += necOf(I) * h;
    else truth.necDay += necOf(I) * h;
    const valid = !drop(t, I);
    windows.push({
      tMs: t,
      valid,
      ncpMmolM2H: ncpOf(I) + noise.ncp * r.normal(),
      ncpSigmaMmolM2H: Math.max(noise.ncp, 1e-3),
      necMmolM2H: necOf(I) + noise.nec * r.normal(),
      necSigmaMmolM2H: Math.max(noise.nec, 1e-3),
      parUmolM2S: I,
    });
  }
  truth.gpp = truth.ncp + truth.r;
  return { windows, truth };
}
const dawnDusk = (_t: number, I: number) => I > 0 && I < 200;

describe('daily budget: data-free analytic cases', () => {
  it('exact windows everywhere: NCP, R, GPP, NEC day and night equal the slot integrals', () => {
    const d = makeDay('2026-06-10', { ncp: 0, nec: 0, seed: 1 });
    const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, OPTS);
    expect(r.valid).toBe(true);
    expect(r.coverage).toBe(1);
    expect(r.gapFilled).toBe(0);
    expect(r.ncp.value).toBeCloseTo(d.truth.ncp, 8);
    expect(r.r.value).toBeCloseTo(24 * 19, 8);
    expect(r.gpp.value).toBeCloseTo(d.truth.gpp, 8);
    expect(r.nec.value).toBeCloseTo(d.truth.nec, 8);
    expect(r.necDay.value).toBeCloseTo(d.truth.necDay, 8);
    expect(r.necNight.value).toBeCloseTo(d.truth.necNight, 8);
    expect(r.pr.value).toBeCloseTo(d.truth.gpp / (24 * 19), 8);
    expect(r.rSource).toBe('night_mean');
    expect(r.nightSlots).toBeGreaterThan(60);
  });

  it('dawn and dusk windows invalid: the exact light-response fill restores the integrals', () => {
    const d = makeDay('2026-06-10', { ncp: 0, nec: 0, seed: 1 }, dawnDusk);
    const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, OPTS);
    expect(r.gapFilled).toBeGreaterThan(0.03);
    expect(r.coverage + r.gapFilled).toBeCloseTo(1, 12);
    expect(r.fillCurve).toBe('day_week_ik');
    expect(r.ncp.value).toBeCloseTo(d.truth.ncp, 4);
    expect(r.gpp.value).toBeCloseTo(d.truth.gpp, 4);
    expect(r.necDay.value).toBeCloseTo(d.truth.necDay, 4);
    if (!r.day.ncp.ok) throw new Error(r.day.ncp.reason);
    expect(r.day.ncp.curve.ik).toBeCloseTo(380, 3);
  });

  it('a 25-hour day (America/New_York, 2026-11-01): respiration is the night rate times 25 h', () => {
    const ny = createLocalCalendar('America/New_York');
    const b = ny.dayBounds('2026-11-01');
    const windows: FluxWindowInput[] = [];
    for (let t = b.startMs + 300_000; t < b.endMs; t += 600_000) {
      const h = (t - b.startMs) / 3.6e6;
      const I = h > 7 && h < 18 ? 1500 * Math.sin((Math.PI * (h - 7)) / 11) : 0;
      windows.push({
        tMs: t,
        valid: true,
        ncpMmolM2H: ncpOf(I),
        ncpSigmaMmolM2H: 1,
        necMmolM2H: null,
        necSigmaMmolM2H: null,
        parUmolM2S: I,
      });
    }
    const r = closeDay(b, windows, windows, { cadenceMin: 10, windowMin: 30 });
    expect(b.hours).toBe(25);
    expect(r.r.value).toBeCloseTo(25 * 19, 8);
    expect(r.coverage).toBe(1);
    expect(r.nec.value).toBeNull();
  });
});

describe('daily budget: sigmas propagated through the windows, the fit and the filling', () => {
  it('z-scores of NCP, R, GPP and NEC over 100 noisy days have unit spread (0.75-1.3)', () => {
    const z: Record<string, number[]> = { ncp: [], r: [], gpp: [], nec: [] };
    for (let k = 0; k < 100; k++) {
      const d = makeDay('2026-06-10', { ncp: 3, nec: 1, seed: 100 + k }, dawnDusk);
      const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, OPTS);
      z.ncp!.push((r.ncp.value! - d.truth.ncp) / r.ncp.sigma!);
      z.r!.push((r.r.value! - d.truth.r) / r.r.sigma!);
      z.gpp!.push((r.gpp.value! - d.truth.gpp) / r.gpp.sigma!);
      z.nec!.push((r.nec.value! - d.truth.nec) / r.nec.sigma!);
    }
    for (const [k, zs] of Object.entries(z)) {
      expect(Math.abs(mean(zs)), k).toBeLessThan(0.3);
      expect(sd(zs), k).toBeGreaterThan(0.75);
      expect(sd(zs), k).toBeLessThan(1.3);
    }
  });

  it('overlapping windows (30 min every 10 min) carry three times the variance of independent ones', () => {
    const d = makeDay('2026-06-10', { ncp: 3, nec: 1, seed: 7 });
    const b = cal.dayBounds('2026-06-10');
    const a = closeDay(b, d.windows, d.windows, OPTS);
    const o = closeDay(b, d.windows, d.windows, { ...OPTS, windowMin: 30 });
    expect(o.ncp.sigma! / a.ncp.sigma!).toBeCloseTo(Math.sqrt(3), 6);
  });
});

describe('daily budget: fallbacks and refusals', () => {
  it('the day fit refused (no bright windows valid): the day windows with the week Ik fill the gaps', () => {
    const d = makeDay('2026-06-10', { ncp: 1, nec: 0.3, seed: 3 }, (_t, I) => I > 300);
    const week = [
      ...makeDay('2026-06-08', { ncp: 1, nec: 0.3, seed: 4 }).windows,
      ...makeDay('2026-06-09', { ncp: 1, nec: 0.3, seed: 5 }).windows,
      ...d.windows,
    ];
    const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, week, { ...OPTS, maxFilledFraction: 0.8 });
    expect(r.day.ncp.ok ? '' : r.day.ncp.code).toBe('REEFD_DAILY_IK_UNRESOLVED');
    expect(r.fillCurve).toBe('day_week_ik');
    if (!r.week.ncp.ok) throw new Error(r.week.ncp.reason);
    expect(Math.abs(r.week.ncp.curve.ik - 380)).toBeLessThan(40);
    expect(r.valid).toBe(true);
    expect(Math.abs(r.ncp.value! - d.truth.ncp)).toBeLessThan(3 * r.ncp.sigma!);
  });

  it('too much of the day filled: the budget is given but not valid, with the reason', () => {
    const d = makeDay('2026-06-10', { ncp: 1, nec: 0.3, seed: 6 }, (t) => Math.floor(t / 3.6e6) % 3 !== 0);
    const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, OPTS);
    expect(r.gapFilled).toBeGreaterThan(0.6);
    expect(r.valid).toBe(false);
    expect(r.invalidReasons).toContain('too_much_filled');
    expect(r.ncp.value).not.toBeNull();
  });

  it('no night windows: R comes from the fitted curve; without PAR, the sun marks the night', () => {
    const d = makeDay('2026-06-10', { ncp: 0, nec: 0, seed: 9 });
    // Night windows invalid, and the PAR sensor silent at night.
    for (const w of d.windows) {
      if (w.parUmolM2S! < 1) w.parUmolM2S = null;
      if (w.parUmolM2S === null) w.valid = false;
    }
    // A few dusk windows keep the fit's dark end.
    const dark = d.windows.filter((w) => w.parUmolM2S === null).slice(0, 4);
    for (const w of dark) {
      w.parUmolM2S = 0;
      w.valid = true;
    }
    const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, {
      ...OPTS,
      maxFilledFraction: 0.9,
    });
    expect(r.rSource).toBe('fit');
    expect(r.r.value).toBeCloseTo(24 * 19, 3);
    // Slots with a little light the sensor did not report are bridged by interpolation (< 1 %).
    expect(Math.abs(r.ncp.value! / d.truth.ncp - 1)).toBeLessThan(0.01);
    const noSun = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, {
      cadenceMin: 10,
      windowMin: 10,
    });
    expect(noSun.invalidReasons).toContain('unfillable_gap');
    expect(noSun.ncp.value).toBeNull();
  });

  it('no night windows and no accepted fit: no respiration', () => {
    const d = makeDay('2026-06-10', { ncp: 1, nec: 0.3, seed: 10 }, (_t, I) => I < 1 || I > 300);
    const r = closeDay(cal.dayBounds('2026-06-10'), d.windows, d.windows, OPTS);
    expect(r.invalidReasons).toContain('no_respiration');
    expect(r.r.value).toBeNull();
    expect(r.gpp.value).toBeNull();
  });
});
