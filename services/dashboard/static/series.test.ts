import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { demoSiteConfig } from '../demo-records.js';
import { siteInfo } from '../site-info.js';
import {
  fluxColumns,
  limitsFor,
  observedNear,
  pan,
  plotColumns,
  rangeWithForecast,
  stationForecast,
  stationGroups,
} from './series.js';
import { RecordStore } from './store.js';

type Rec = DerivedRecord & Record<string, unknown>;
const MIN = 60_000;
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();
const site = siteInfo(demoSiteConfig(), { windowMs: 48 * 3.6e6, resolutionMs: 6e5 });
const o2 = (i: number, v: number, flag = 1, sensor = 'o2-lagoon'): Rec =>
  ({
    type: 'oxygen',
    site: 'ornen-reef',
    t: iso(T0 + i * 5 * MIN),
    station: 'lagoon',
    sensor,
    o2_umol_kg: v * 31,
    o2_sat_pct: 80,
    o2_mg_l: v,
    flag,
  }) as Rec;

describe('plot columns', () => {
  it('leaves failed values out of the line, marks suspect and failed ones, and breaks the line at a silence', () => {
    const s = new RecordStore();
    s.add([o2(0, 5), o2(1, 5.1, 3), o2(2, 9.9, 4), o2(3, 5.2), o2(10, 5.3), o2(11, 5.4)]);
    const c = plotColumns(s.seriesOf('oxygen', 'lagoon'), 'o2_mg_l', T0, T0 + 3_600_000);
    const sec = (i: number) => (T0 + i * 5 * MIN) / 1000;
    expect(c.xs).toEqual([sec(0), sec(1), sec(2), sec(3), (sec(3) + sec(10)) / 2, sec(10), sec(11)]);
    expect(c.lines[0]).toEqual([5, 5.1, null, 5.2, null, 5.3, 5.4]);
    expect(c.marks).toEqual([
      { x: sec(1), y: 5.1, flag: 3, line: 0 },
      { x: sec(2), y: 9.9, flag: 4, line: 0 },
    ]);
  });

  it('draws two sensors of one kind as two lines on one time axis', () => {
    const s = new RecordStore();
    s.add([o2(0, 5), o2(1, 5.1), o2(0, 6, 1, 'o2-lagoon-b')]);
    const c = plotColumns(s.seriesOf('oxygen', 'lagoon'), 'o2_mg_l', T0, T0 + 3_600_000);
    expect(c.sensors).toEqual(['o2-lagoon', 'o2-lagoon-b']);
    expect(c.lines).toEqual([
      [5, 5.1],
      [6, null],
    ]);
  });

  it('spans invalid flux windows with their reasons and keeps significance per point', () => {
    const f = (i: number, valid: boolean, reasons = '', ncp = 10): Rec =>
      ({
        type: 'flux',
        site: 'ornen-reef',
        t: iso(T0 + i * 10 * MIN),
        transect: 'inner',
        ncp_mmol_m2_h: ncp,
        nec_mmol_m2_h: 2,
        nec_method: 'inverse',
        u_m_s: 0.1,
        depth_m: 1.2,
        residence_min: 30,
        valid,
        ncp_significant: valid && ncp > 5,
        nec_significant: false,
        ncp_sigma_mmol_m2_h: 2,
        nec_sigma_mmol_m2_h: 4,
        ...(reasons ? { invalid_reasons: reasons } : {}),
      }) as Rec;
    const s = new RecordStore();
    s.add([
      f(0, true),
      f(1, false, 'storage_dominates'),
      f(2, false, 'storage_dominates'),
      f(3, true, '', 3),
      f(4, false, 'input_missing'),
    ]);
    const c = fluxColumns(s.seriesOf('flux', 'inner')[0]!, T0, T0 + 3_600_000, 30);
    expect(c.ncp).toEqual([10, null, null, 3, null]);
    expect(c.ncpLo).toEqual([8, null, null, 1, null]);
    expect(c.ncpSig).toEqual([true, false, false, false, false]);
    const x = (i: number) => (T0 + i * 10 * MIN) / 1000;
    expect(c.invalid).toEqual([
      { fromS: x(1) - 900, toS: x(2) + 900, reasons: 'storage_dominates' },
      { fromS: x(4) - 900, toS: x(4) + 900, reasons: 'input_missing' },
    ]);
  });
});

describe('what a station shows', () => {
  it('shows each measured quantity where a sensor measures it, with the limits of the site', () => {
    const store = new RecordStore();
    const groups = (id: string) =>
      stationGroups(site, id, store).map((g) => `${g.group}: ${g.items.map((i) => i.field).join(' ')}`);
    expect(groups('flat')).toEqual([
      'Oxygen and water: o2_mg_l o2_sat_pct temp_c sal',
      'Carbonate chemistry: pco2_uatm omega_ar ph_total',
      'Water level, waves and current: depth_m hm0_m tp_s speed_m_s dir_to_deg',
      'Light: par_umol_m2_s',
    ]);
    expect(groups('channel')).toEqual([
      'Water level, waves and current: depth_m hm0_m tp_s speed_m_s dir_to_deg',
    ]);
    expect(groups('mast')).toEqual([]); // no weather records yet: nothing to plot
    expect(limitsFor(site, 'oxygen', 'o2_mg_l', 'lagoon').map((r) => [r.id, r.limit])).toEqual([
      ['low_oxygen', 2],
    ]);
    expect(limitsFor(site, 'oxygen', 'o2_sat_pct', 'lagoon')).toEqual([]);
  });

  it('pans a range but never past now', () => {
    expect(pan({ fromMs: 0, toMs: 100 }, -0.5, 1000)).toEqual({ fromMs: -50, toMs: 50 });
    expect(pan({ fromMs: 900, toMs: 1000 }, 0.5, 1000)).toEqual({ fromMs: 950, toMs: 1050 });
    // Later than now (plus a minute of margin) is not shown: the range stops there.
    expect(pan({ fromMs: 0, toMs: 100_000 }, 0.5, 1000)).toEqual({ fromMs: -39_000, toMs: 61_000 });
  });
});

describe("tonight's forecast on the oxygen plot", () => {
  const HOUR = 3_600_000;
  const fc = (issueH: number, minH: number, min: number, lo = min - 0.4, hi = min + 0.5): Rec =>
    ({
      type: 'forecast',
      site: 'ornen-reef',
      t: iso(T0 + issueH * HOUR),
      station: 'lagoon',
      o2_min_mg_l: min,
      o2_min_lo_mg_l: lo,
      o2_min_hi_mg_l: hi,
      t_min: iso(T0 + minH * HOUR),
      horizon_h: minH - issueH,
    }) as Rec;
  const list = [fc(4, 15, 3.1), fc(5, 15.5, 2.6), fc(6, 15.5, 2.2, 1.7, 2.9)];

  it('shows the newest forecast issued by the end of the range, at its expected minimum', () => {
    const m = stationForecast(list, { fromMs: T0, toMs: T0 + 7 * HOUR })!;
    expect([m.tMinS, m.minMgL, m.loMgL, m.hiMgL, m.issuedMs]).toEqual([
      (T0 + 15.5 * HOUR) / 1000,
      2.2,
      1.7,
      2.9,
      T0 + 6 * HOUR,
    ]);
    // A range ending before the last issue shows the forecast of its own time.
    expect(stationForecast(list, { fromMs: T0, toMs: T0 + 5.5 * HOUR })?.minMgL).toBe(2.6);
    // A range after the night's minimum shows none; so does a range before any issue.
    expect(stationForecast(list, { fromMs: T0 + 16 * HOUR, toMs: T0 + 30 * HOUR })).toBeNull();
    expect(stationForecast(list, { fromMs: T0 - 9 * HOUR, toMs: T0 + HOUR })).toBeNull();
    // A record without its interval is passed over.
    expect(
      stationForecast([list[0]!, { ...list[1]!, o2_min_hi_mg_l: null } as Rec], {
        fromMs: T0,
        toMs: T0 + 7 * HOUR,
      })?.minMgL,
    ).toBe(3.1);
  });

  it('reaches on to a minimum still ahead of a range ending now, not of a zoomed one', () => {
    const m = stationForecast(list, { fromMs: T0, toMs: T0 + 7 * HOUR });
    const r = { fromMs: T0 - 17 * HOUR, toMs: T0 + 7 * HOUR };
    const to = T0 + 15.5 * HOUR;
    expect(rangeWithForecast(r, m, true)).toEqual({ fromMs: r.fromMs, toMs: to + 0.05 * (to - r.fromMs) });
    expect(rangeWithForecast(r, m, false)).toBe(r);
    expect(rangeWithForecast({ fromMs: r.fromMs, toMs: T0 + 16 * HOUR }, m, true).toMs).toBe(T0 + 16 * HOUR);
    expect(rangeWithForecast(r, null, true)).toBe(r);
  });

  it('reads the observed oxygen nearest the expected minimum, passing over failed values', () => {
    const s = new RecordStore();
    s.add([o2(0, 5), o2(1, 4.8), o2(2, 9.9, 4), o2(3, 4.6)]);
    const series = s.seriesOf('oxygen', 'lagoon');
    const at = (i: number) => T0 + i * 5 * MIN;
    expect(observedNear(series, 'o2_mg_l', at(1) + MIN, 10 * MIN)).toEqual({ value: 4.8, tMs: at(1) });
    // The failed value at 10 min is nearest but not an observation: the next one is.
    expect(observedNear(series, 'o2_mg_l', at(2) + MIN, 10 * MIN)).toEqual({ value: 4.6, tMs: at(3) });
    expect(observedNear(series, 'o2_mg_l', at(3) + 20 * MIN, 10 * MIN)).toBeNull();
  });
});
