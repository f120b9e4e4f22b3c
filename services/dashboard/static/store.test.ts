import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { RecordStore } from './store.js';

type Rec = DerivedRecord & Record<string, unknown>;
const MIN = 60_000;
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();
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

describe('RecordStore', () => {
  it('merges history, live records and fetched ranges in time order, one record per time', () => {
    const s = new RecordStore(100);
    s.add([o2(0, 5), o2(2, 5.2)]);
    s.add([o2(1, 5.1), o2(2, 5.25), o2(3, 5.3)]);
    const [series] = s.seriesOf('oxygen', 'lagoon');
    expect(series!.r.map((r) => r.o2_mg_l)).toEqual([5, 5.1, 5.25, 5.3]);
    expect(s.latestByPlace().get('oxygen|lagoon')?.o2_mg_l).toBe(5.3);
    const bounded = new RecordStore(10);
    bounded.add(Array.from({ length: 30 }, (_, i) => o2(i, 5)));
    expect(bounded.seriesOf('oxygen', 'lagoon')[0]!.t[0]).toBe(T0 + 20 * 5 * MIN);
  });
});

describe('RecordStore for a large site', () => {
  it('keeps whole series only where asked, and the newest record of every series', () => {
    let shown = 'lagoon';
    const s = new RecordStore(100, (r) => r.station === shown);
    s.add([
      o2(0, 5),
      o2(1, 5.1),
      { ...o2(0, 6), station: 'crest', sensor: 'o2-crest' },
      { ...o2(1, 6.1), station: 'crest', sensor: 'o2-crest' },
    ]);
    expect(s.seriesOf('oxygen', 'lagoon')[0]!.r).toHaveLength(2);
    expect(s.seriesOf('oxygen', 'crest')).toEqual([]);
    expect(s.latestByPlace().get('oxygen|crest')?.o2_mg_l).toBe(6.1);
    shown = 'crest';
    s.prune();
    expect(s.seriesOf('oxygen', 'lagoon')).toEqual([]);
    expect(s.latestByPlace().get('oxygen|lagoon')?.o2_mg_l).toBe(5.1);
  });
});
