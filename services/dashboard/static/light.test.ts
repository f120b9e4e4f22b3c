import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import {
  curveOf,
  curveValue,
  dayBounds,
  fitSentence,
  latestFit,
  lightColumns,
  nearestPoint,
} from './light.js';
import { RecordStore } from './store.js';

type Rec = DerivedRecord & Record<string, unknown>;
const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY0 = Date.UTC(2026, 1, 28, 10); // local midnight at UTC-10
const iso = (ms: number) => new Date(ms).toISOString();

// The budgets of the day are not read by the light plot: present as the contract has them, without values.
const budgets = {
  ncp_mmol_m2_d: null,
  ncp_mmol_m2_d_sigma: null,
  r_mmol_m2_d: null,
  r_mmol_m2_d_sigma: null,
  gpp_mmol_m2_d: null,
  gpp_mmol_m2_d_sigma: null,
  nec_mmol_m2_d: null,
  nec_mmol_m2_d_sigma: null,
  nec_day_mmol_m2_d: null,
  nec_day_mmol_m2_d_sigma: null,
  nec_night_mmol_m2_d: null,
  nec_night_mmol_m2_d_sigma: null,
};

const daily = (day: string, startMs: number, extra: Record<string, unknown> = {}): Rec =>
  ({
    type: 'daily',
    site: 'ornen-reef',
    transect: 'outer',
    day,
    t: iso(startMs),
    ...budgets,
    coverage: 0.8,
    gap_filled: 0.1,
    valid: true,
    pmax_mmol_m2_h: 50,
    ik_umol_m2_s: 400,
    r_fit_mmol_m2_h: 20,
    day_hours: 24,
    ...extra,
  }) as Rec;

const flux = (
  tMs: number,
  par: number | undefined,
  ncp: number | null,
  valid = true,
  nec: number | null = 3,
) =>
  ({
    type: 'flux',
    site: 'ornen-reef',
    transect: 'outer',
    t: iso(tMs),
    valid,
    ncp_mmol_m2_h: ncp,
    ncp_sigma_mmol_m2_h: 2,
    nec_mmol_m2_h: nec,
    nec_sigma_mmol_m2_h: nec === null ? null : 4,
    ...(par === undefined ? {} : { par_umol_m2_s: par }),
  }) as unknown as Rec;

describe('the fitted light-response curves', () => {
  it('evaluates NCP = Pmax tanh(I/Ik) - R and NEC = Gmax tanh(I/Ik) + G0', () => {
    const c = curveOf(daily('2026-02-28', DAY0), 'ncp')!;
    expect(c).toEqual({ amp: 50, ik: 400, intercept: 20, sign: -1 });
    // tanh(1) = 0.761594..., tanh(3) = 0.995055... (values of the function, from memory).
    expect(curveValue(c, 0)).toBe(-20);
    expect(curveValue(c, 400)).toBeCloseTo(50 * 0.7615941559557649 - 20, 12);
    expect(curveValue(c, 1200)).toBeCloseTo(50 * 0.9950547536867305 - 20, 12);
    expect(curveValue(c, -5)).toBe(-20); // a slightly negative PAR reading is dark
    const g = curveOf(
      daily('2026-02-28', DAY0, { gmax_mmol_m2_h: 8, ik_nec_umol_m2_s: 200, g0_mmol_m2_h: 1.5 }),
      'nec',
    )!;
    expect(curveValue(g, 200)).toBeCloseTo(8 * 0.7615941559557649 + 1.5, 12);
    expect(curveValue(g, 0)).toBe(1.5);
  });

  it('has no curve where the fit was refused, and draws the newest day with one', () => {
    const refused = daily('2026-02-28', DAY0, {
      pmax_mmol_m2_h: null,
      ik_umol_m2_s: null,
      r_fit_mmol_m2_h: undefined,
      ncp_fit_refused: 'REEFD_DAILY_IK_UNRESOLVED',
    });
    expect(curveOf(refused, 'ncp')).toBeNull();
    expect(curveOf(daily('x', DAY0), 'nec')).toBeNull(); // no calcification fit in the record
    expect(curveOf(daily('x', DAY0, { ik_umol_m2_s: 0 }), 'ncp')).toBeNull();
    const before = daily('2026-02-27', DAY0 - 24 * HOUR, { pmax_mmol_m2_h: 61 });
    expect(latestFit([before, refused])?.day).toBe('2026-02-27');
    expect(latestFit([before, daily('2026-02-28', DAY0)])?.day).toBe('2026-02-28');
    expect(latestFit([refused])).toBeNull();
  });

  it('takes the local day from the record, 23 or 25 hours at a change of summer time', () => {
    expect(dayBounds(daily('d', DAY0))).toEqual({ fromMs: DAY0, toMs: DAY0 + 24 * HOUR });
    expect(dayBounds(daily('d', DAY0, { day_hours: 23 }))).toEqual({ fromMs: DAY0, toMs: DAY0 + 23 * HOUR });
  });
});

describe('the windows against their light', () => {
  const store = new RecordStore();
  store.add([
    flux(DAY0 - 2 * HOUR, 0, -18), // the day before, outside the range shown: left out
    flux(DAY0 + 8 * HOUR, 600, 22), // of the fitted day
    flux(DAY0 + 12 * HOUR, 1500, 29),
    flux(DAY0 + 13 * HOUR, 1400, 99, false), // not valid: left out
    flux(DAY0 + 14 * HOUR, undefined, 25), // no PAR: left out
    flux(DAY0 + 20 * HOUR, 0, -21, true, null), // no NEC
    flux(DAY0 + 25 * HOUR, 0, -19), // the next day, in the range shown
  ]);
  const s = store.seriesOf('flux', 'outer')[0]!;
  const d = daily('2026-02-28', DAY0);
  const range = { fromMs: DAY0 + 6 * HOUR, toMs: DAY0 + 30 * HOUR };

  it('plots the valid windows with a PAR, those of the fitted day apart, PAR ascending', () => {
    const c = lightColumns(s, d, 'ncp', range, 5);
    expect(c.dayCount).toBe(3);
    expect(c.otherCount).toBe(1);
    expect(c.points.map((p) => [p.par, p.rate, p.ofDay])).toEqual([
      [600, 22, true],
      [1500, 29, true],
      [0, -21, true],
      [0, -19, false],
    ]);
    expect(c.lastMs).toBe(DAY0 + 25 * HOUR);
    // The curve's grid: five points from dark to 5 % past the brightest window.
    const grid = [0, 393.75, 787.5, 1181.25, 1575];
    expect([...c.xs]).toEqual([0, 0, 0, 393.75, 600, 787.5, 1181.25, 1500, 1575]);
    expect(c.xs.filter((_, i) => c.rows[i] === null)).toEqual(grid);
    expect(c.day.filter((v) => v !== null).sort()).toEqual([-21, 22, 29].sort());
    expect(c.other.filter((v) => v !== null)).toEqual([-19]);
    c.xs.forEach((x, i) => expect(c.curve[i]).toBeCloseTo(50 * Math.tanh(x / 400) - 20, 12));
    expect(c.curveParams).toEqual({ amp: 50, ik: 400, intercept: 20, sign: -1 });
  });

  it('reaches the fitted day outside the range shown, and leaves windows without a rate out of NEC', () => {
    const late = { fromMs: DAY0 + 24 * HOUR, toMs: DAY0 + 30 * HOUR };
    const c = lightColumns(s, d, 'ncp', late, 3);
    expect(c.dayCount).toBe(3);
    expect(c.otherCount).toBe(1);
    const n = lightColumns(s, d, 'nec', range, 3);
    expect(n.points.map((p) => p.par)).toEqual([600, 1500, 0]);
    expect(n.curveParams).toBeNull();
    expect(n.curve.every((v) => v === null)).toBe(true);
    expect(n.xs).toEqual([0, 600, 1500]); // no curve: no grid rows
    // Without a daily record every window is 'other'.
    const none = lightColumns(s, null, 'ncp', range);
    expect([none.dayCount, none.otherCount]).toEqual([0, 4]);
  });

  it('finds the window nearest the cursor within a few pixels', () => {
    const pts = lightColumns(s, d, 'ncp', range, 3).points;
    const toPx = (p: { par: number; rate: number }) => ({ x: p.par / 10, y: -p.rate });
    expect(nearestPoint(pts, toPx, { x: 61, y: -21 }, 6)?.par).toBe(600);
    expect(nearestPoint(pts, toPx, { x: 100, y: 0 }, 6)).toBeNull();
  });
});

describe('the fit in words', () => {
  it('names the curve, its parameters with their sigmas and the units of the site', () => {
    const fields = {
      pmax_mmol_m2_h: { unit: 'mmol m-2 h-1' },
      ik_umol_m2_s: { unit: 'umol m-2 s-1' },
      r_fit_mmol_m2_h: { unit: 'mmol m-2 h-1' },
    };
    const d = daily('2026-02-28', DAY0, {
      pmax_mmol_m2_h: 51.992,
      pmax_mmol_m2_h_sigma: 3.14,
      ik_umol_m2_s: 365.1,
      ik_umol_m2_s_sigma: 40.2,
      r_fit_mmol_m2_h: 19.447,
    });
    expect(fitSentence(d, 'ncp', fields)).toBe(
      'NCP = Pmax tanh(I/Ik) − R, fitted to the windows of 2026-02-28: Pmax 52.0 ± 3.1 mmol m⁻² h⁻¹, ' +
        'Ik 365 ± 40 µmol m⁻² s⁻¹, R 19.4 mmol m⁻² h⁻¹.',
    );
    expect(fitSentence(d, 'nec', fields)).toBe('No NEC curve was fitted to the windows of 2026-02-28.');
  });
});
