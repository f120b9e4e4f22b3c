import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { demoSiteConfig } from '../demo-records.js';
import { siteInfo } from '../site-info.js';
import { fluxColumns, limitsFor, pan, plotColumns, stationGroups } from './series.js';
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
