import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { RecordHistory } from './history.js';
import { createRecordStore } from '../records/index.js';
import { historyRecordQuery, recordStoreQuery, type RecordQuery } from './record-query.js';

const MIN = 60_000;
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();
const rec = (i: number, station = 'lagoon'): DerivedRecord =>
  ({
    type: i % 2 ? 'oxygen' : 'carbonate',
    site: 'ornen-reef',
    t: iso(T0 + i * 5 * MIN),
    station,
    sensor: 's',
    ...(i % 2
      ? { o2_umol_kg: 200, o2_sat_pct: 90, o2_mg_l: 6.4 + i / 1e4 }
      : {
          ta_umol_kg: 2300,
          dic_umol_kg: 2000,
          ph_total: 8,
          pco2_uatm: 400 + i,
          co3_umol_kg: 200,
          omega_ar: 3.5,
          omega_ca: 5,
          ta_source: 'salinity',
        }),
  }) as DerivedRecord;

async function all_(q: RecordQuery, f: Parameters<RecordQuery['query']>[0], limit: number) {
  const out: DerivedRecord[] = [];
  let cursor: string | undefined;
  let pages = 0;
  do {
    const p = await q.query(f, { limit, ...(cursor !== undefined ? { cursor } : {}) });
    out.push(...p.records);
    cursor = p.next;
    pages++;
  } while (cursor !== undefined && pages < 1000);
  return { out, pages };
}

describe('recordStoreQuery', () => {
  it('pages through a range of the record store, several types and one station at a time', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-rq-'));
    const store = await createRecordStore({ dir, retentionDays: 0, fsyncMs: 5, clock: () => T0 });
    // 30 days of two stations at 5 min (oxygen and carbonate in turn): 30 day files.
    const all: DerivedRecord[] = [];
    for (let i = 0; i < 30 * 288; i++) all.push(rec(i), rec(i, 'crest'));
    await store.append(all);
    const q = recordStoreQuery(store, 'record store');
    expect(q.source).toBe('record store');
    const fromMs = T0 + 10 * 86_400_000;
    const toMs = fromMs + 86_400_000;
    const one = await all_(q, { types: ['oxygen'], station: 'lagoon', fromMs, toMs }, 50);
    expect(one.out).toHaveLength(144); // every other 5-min record of one day
    expect(one.pages).toBe(3);
    expect(one.out.every((r) => r.type === 'oxygen' && r.station === 'lagoon')).toBe(true);
    expect(one.out[0]!.t).toBe(iso(fromMs + 5 * MIN));
    expect(one.out.at(-1)!.t).toBe(iso(toMs - 5 * MIN));
    // Two types: the store is asked for every type of the station and the page is filtered here.
    const two = await all_(q, { types: ['oxygen', 'carbonate'], station: 'crest', fromMs, toMs }, 100);
    expect(two.out).toHaveLength(288);
    expect(two.out.every((r) => r.station === 'crest')).toBe(true);
    expect(two.out.map((r) => r.t)).toEqual([...two.out.map((r) => r.t)].sort());
    await store.close();
  });
});

describe('historyRecordQuery', () => {
  it('serves the dashboard history through the same interface, paged', async () => {
    const h = new RecordHistory({ resolutionMs: 5 * MIN });
    h.add(Array.from({ length: 100 }, (_, i) => rec(2 * i + 1)));
    const q = historyRecordQuery(h);
    const { out, pages } = await all_(q, { types: ['oxygen'], fromMs: T0, toMs: T0 + 1e12 }, 30);
    expect(out).toHaveLength(100);
    expect(pages).toBe(4);
    expect(q.source).toMatch(/dashboard history \(5-min buckets, last 48 h\)/);
  });
});
