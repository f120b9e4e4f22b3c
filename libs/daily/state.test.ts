import { describe, expect, it } from 'vitest';
import { closeDay, type DailyOptions, type DailyResult } from './close-day.js';
import { createLocalCalendar } from './local-day.js';
import { toDailyRecord } from './record.js';
import type { FluxWindowInput } from './slots.js';
import { addWindow, closeDueDays, createDailyState, packWindow, unpackWindow } from './state.js';
import { solarElevationDeg } from './sun.js';
import { seeded } from './test-helpers.js';

const cal = createLocalCalendar('Etc/GMT+10');
const OPTS: DailyOptions = { cadenceMin: 10, windowMin: 30, sun: { latDeg: 8, lonDeg: -145 } };

function windows(fromMs: number, toMs: number, seed: number): FluxWindowInput[] {
  const r = seeded(seed);
  const out: FluxWindowInput[] = [];
  for (let t = fromMs + 300_000; t < toMs; t += 600_000) {
    const e = solarElevationDeg(t, 8, -145);
    const I = e <= 0 ? 0 : 2000 * Math.sin((e * Math.PI) / 180) ** 1.2;
    out.push({
      tMs: t,
      valid: !(I > 0 && I < 150) && r.uniform() > 0.1,
      ncpMmolM2H: 55 * Math.tanh(I / 400) - 18 + 2 * r.normal(),
      ncpSigmaMmolM2H: 2,
      necMmolM2H: 8 * Math.tanh(I / 300) + 1.5 + 0.5 * r.normal(),
      necSigmaMmolM2H: 0.5,
      parUmolM2S: I,
      omegaAr: 3.2 + I / 2000,
    });
  }
  return out;
}

describe('incremental daily state', () => {
  const start = cal.dayBounds('2026-06-01').startMs + 13 * 3.6e6; // deployed in the early afternoon
  const all = windows(start, cal.dayBounds('2026-06-12').startMs + 2 * 3.6e6, 5);

  function run(checkpointEvery?: number) {
    let state = createDailyState();
    const out: DailyResult[] = [];
    all.forEach((w, i) => {
      addWindow(state, w);
      out.push(...closeDueDays(state, cal, w.tMs + 600_000, OPTS));
      if (checkpointEvery && i % checkpointEvery === 0) state = JSON.parse(JSON.stringify(state));
    });
    return { state, out };
  }

  it('closes each local day once its last window is in, the first (partial) day included', () => {
    const { out } = run();
    expect(out.map((r) => r.bounds.day)).toEqual([
      '2026-06-01',
      '2026-06-02',
      '2026-06-03',
      '2026-06-04',
      '2026-06-05',
      '2026-06-06',
      '2026-06-07',
      '2026-06-08',
      '2026-06-09',
      '2026-06-10',
      '2026-06-11',
    ]);
    expect(out[0]!.invalidReasons).toContain('unfillable_gap');
    expect(out.slice(1).every((r) => r.valid)).toBe(true);
  });

  it('gives what a batch close of the same windows gives (day and sliding week)', () => {
    const { out } = run();
    const day = out.find((r) => r.bounds.day === '2026-06-09')!;
    const b = cal.dayBounds('2026-06-09');
    // The state keeps windows to 1e-6 of their unit: the batch gets the same values.
    const same = all.map((w) => unpackWindow(packWindow(w)));
    const week = same.filter((w) => w.tMs >= cal.dayBounds('2026-06-03').startMs && w.tMs < b.endMs);
    const batch = closeDay(
      b,
      same.filter((w) => w.tMs >= b.startMs && w.tMs < b.endMs),
      week,
      OPTS,
    );
    expect(toDailyRecord('s', 'outer', day)).toEqual(toDailyRecord('s', 'outer', batch));
    if (!day.week.ncp.ok || !day.day.ncp.ok) throw new Error('fit refused');
    expect(day.week.ncp.n).toBeGreaterThan(5 * day.day.ncp.n);
  });

  it('a JSON checkpoint round trip at any point changes no record', () => {
    const plain = run().out.map((r) => toDailyRecord('s', 'outer', r));
    const resumed = run(37).out.map((r) => toDailyRecord('s', 'outer', r));
    expect(resumed).toEqual(plain);
  });

  it('keeps only the sliding week of windows', () => {
    const { state } = run();
    const oldest = state.windows[0]![0];
    // Closed days keep only their valid windows; the open day keeps all.
    const closedEnd = cal.dayBounds('2026-06-11').endMs;
    expect(state.windows.filter((w) => w[0] < closedEnd).every((w) => w[1] === 1)).toBe(true);
    expect(state.windows.some((w) => w[0] >= closedEnd && w[1] === 0)).toBe(true);
    expect(oldest).toBeGreaterThanOrEqual(cal.dayBounds('2026-06-06').startMs);
    expect(state.lastClosedDay).toBe('2026-06-11');
  });

  it('does not close a day before its windows are final; a silent day gives nothing', () => {
    const s = createDailyState();
    const d1 = windows(cal.dayBounds('2026-06-01').startMs, cal.dayBounds('2026-06-02').startMs, 1);
    const d4 = windows(cal.dayBounds('2026-06-04').startMs, cal.dayBounds('2026-06-05').startMs, 2);
    for (const w of d1) addWindow(s, w);
    expect(closeDueDays(s, cal, cal.dayBounds('2026-06-02').startMs - 1, OPTS)).toEqual([]);
    expect(closeDueDays(s, cal, cal.dayBounds('2026-06-02').startMs, OPTS).map((r) => r.bounds.day)).toEqual([
      '2026-06-01',
    ]);
    for (const w of d4) addWindow(s, w);
    const later = closeDueDays(s, cal, cal.dayBounds('2026-06-05').startMs, OPTS);
    expect(later.map((r) => r.bounds.day)).toEqual(['2026-06-04']);
    // The week of 06-04 holds 06-01 too.
    if (!later[0]!.week.ncp.ok) throw new Error('week fit refused');
    expect(later[0]!.week.ncp.n).toBeGreaterThan(later[0]!.day.ncp.ok ? later[0]!.day.ncp.n : 0);
  });

  it('a window re-sent with the same centre replaces the first', () => {
    const s = createDailyState();
    const w = windows(cal.dayBounds('2026-06-01').startMs, cal.dayBounds('2026-06-01').startMs + 3.6e6, 1);
    for (const x of w) addWindow(s, x);
    addWindow(s, { ...w[2]!, ncpMmolM2H: 99 });
    addWindow(s, w[0]!);
    expect(s.windows.length).toBe(w.length);
    expect(unpackWindow(s.windows[2]!).ncpMmolM2H).toBe(99);
  });
});

describe('the daily record (contract extension E3)', () => {
  it('carries the contract fields with their units and sigmas, t the start of the local day in UTC', () => {
    const b = cal.dayBounds('2026-06-05');
    const ws = windows(b.startMs, b.endMs, 3);
    const rec = toDailyRecord('ornen-reef', 'outer', closeDay(b, ws, ws, OPTS));
    expect(rec.type).toBe('daily');
    expect(rec.day).toBe('2026-06-05');
    expect(rec.t).toBe('2026-06-05T10:00:00.000Z');
    for (const k of ['ncp', 'r', 'gpp', 'nec', 'nec_day', 'nec_night']) {
      expect(typeof rec[`${k}_mmol_m2_d`]).toBe('number');
      expect(rec[`${k}_mmol_m2_d_sigma`] as number).toBeGreaterThan(0);
    }
    expect(rec.gpp_mmol_m2_d).toBeCloseTo(rec.ncp_mmol_m2_d! + rec.r_mmol_m2_d!, 1);
    expect(rec.nec_mmol_m2_d).toBeCloseTo(rec.nec_day_mmol_m2_d! + rec.nec_night_mmol_m2_d!, 1);
    expect(rec.r_mmol_m2_d!).toBeGreaterThan(0);
    expect(rec.coverage + rec.gap_filled + (rec.interpolated as number)).toBeCloseTo(1, 3);
    expect(rec.pmax_mmol_m2_h!).toBeGreaterThan(45);
    expect(rec.pmax_mmol_m2_h!).toBeLessThan(65);
    expect(rec.ik_umol_m2_s!).toBeGreaterThan(300);
    expect(rec.ik_umol_m2_s!).toBeLessThan(500);
    expect(rec.valid).toBe(true);
    expect(rec.nec_omega_slope as number).toBeGreaterThan(0);
    expect(JSON.parse(JSON.stringify(rec))).toEqual(rec);
  });
});
