import { appendFile, mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { RecordHistory } from './history.js';
import { historyRecordQuery, ndjsonRecordQuery, type RecordQuery } from './record-query.js';

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

async function all(q: RecordQuery, f: Parameters<RecordQuery['query']>[0], limit: number) {
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

describe('ndjsonRecordQuery', () => {
  it('pages through a range of an output file with a cursor, filtered by type and station', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-rq-'));
    const file = path.join(dir, 'records.ndjson');
    // ~12 MB: 30 days of two stations at 5 min, so the sparse index has many chunks to skip.
    const lines: string[] = [];
    for (let i = 0; i < 30 * 288; i++) lines.push(JSON.stringify(rec(i)), JSON.stringify(rec(i, 'crest')));
    await writeFile(file, lines.join('\n') + '\n');
    const q = ndjsonRecordQuery(file, 'records.ndjson');
    expect(q.source).toBe('ndjson:records.ndjson');
    expect(await q.latestMs!()).toBe(T0 + (30 * 288 - 1) * 5 * MIN);
    const fromMs = T0 + 10 * 86_400_000;
    const toMs = fromMs + 86_400_000;
    const { out, pages } = await all(q, { types: ['oxygen'], station: 'lagoon', fromMs, toMs }, 50);
    expect(out).toHaveLength(144); // every other 5-min record of one day
    expect(pages).toBe(3);
    expect(out.every((r) => r.type === 'oxygen' && r.station === 'lagoon')).toBe(true);
    expect(out[0]!.t).toBe(iso(fromMs + 5 * MIN));
    expect(out.at(-1)!.t).toBe(iso(toMs - 5 * MIN));
    // Records written after the first query are found (the index extends over the new bytes only).
    await appendFile(file, JSON.stringify(rec(30 * 288)) + '\n');
    expect(await q.latestMs!()).toBe(T0 + 30 * 288 * 5 * MIN);
  });

  it('answers an empty page for a missing file and skips a line still being written', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-rq-'));
    const file = path.join(dir, 'records.ndjson');
    const q = ndjsonRecordQuery(file);
    expect((await q.query({ fromMs: 0, toMs: Infinity }, { limit: 10 })).records).toEqual([]);
    await writeFile(file, JSON.stringify(rec(1)) + '\n' + JSON.stringify(rec(3)).slice(0, 30));
    const p = await q.query({ fromMs: 0, toMs: Infinity }, { limit: 10 });
    expect(p.records.map((r) => r.t)).toEqual([iso(T0 + 5 * MIN)]);
    expect(p.next).toBeUndefined();
  });
});

describe('historyRecordQuery', () => {
  it('serves the dashboard history through the same interface, paged', async () => {
    const h = new RecordHistory({ resolutionMs: 5 * MIN });
    h.add(Array.from({ length: 100 }, (_, i) => rec(2 * i + 1)));
    const q = historyRecordQuery(h);
    const { out, pages } = await all(q, { types: ['oxygen'], fromMs: T0, toMs: T0 + 1e12 }, 30);
    expect(out).toHaveLength(100);
    expect(pages).toBe(4);
    expect(q.source).toMatch(/dashboard history \(5-min buckets, last 48 h\)/);
  });
});
