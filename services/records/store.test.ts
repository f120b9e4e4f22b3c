// The durable record store: day files by event time, latest revision wins, paging by cursor across days,
// filters, retention by age and size, and a line cut short by a crash.
import { appendFile, mkdtemp, readdir, readFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { parseRecordQuery } from './query.js';
import { createRecordStore, RecordStoreError } from './store.js';

const T0 = Date.UTC(2026, 6, 14);
const MIN = 60_000;
const oxygen = (tMs: number, station: string, o2: number, extra: Record<string, unknown> = {}) =>
  ({
    type: 'oxygen',
    site: 's',
    t: new Date(tMs).toISOString(),
    station,
    sensor: `o2-${station}`,
    o2_umol_kg: o2,
    o2_sat_pct: 90,
    o2_mg_l: 6,
    ...extra,
  }) as DerivedRecord;
const flux = (tMs: number, ncp: number, extra: Record<string, unknown> = {}) =>
  ({
    type: 'flux',
    site: 's',
    t: new Date(tMs).toISOString(),
    transect: 'inner',
    ncp_mmol_m2_h: ncp,
    nec_mmol_m2_h: null,
    nec_method: null,
    u_m_s: 0.1,
    depth_m: 1,
    residence_min: 20,
    valid: true,
    ncp_significant: false,
    nec_significant: false,
    ...extra,
  }) as DerivedRecord;

async function store(
  opts: {
    retentionDays?: number;
    maxTotalMb?: number;
    now?: number;
    appendLines?: (file: string, lines: readonly string[]) => Promise<void>;
  } = {},
) {
  const dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-records-'));
  const s = await createRecordStore({
    dir,
    retentionDays: opts.retentionDays ?? 0,
    fsyncMs: 5,
    clock: () => opts.now ?? T0,
    ...(opts.maxTotalMb !== undefined ? { maxTotalMb: opts.maxTotalMb } : {}),
    ...(opts.appendLines !== undefined ? { appendLines: opts.appendLines } : {}),
  });
  return { dir, s };
}

describe('record store', () => {
  it('loses nothing on a full disk: the lines wait and are written once space returns', async () => {
    let fullFor = 2;
    const tries: number[] = [];
    const { dir, s } = await store({
      appendLines: async (file, lines) => {
        tries.push(lines.length);
        if (fullFor-- > 0)
          throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
        await appendFile(file, lines.join('\n') + '\n');
      },
    });
    const first = s.append([oxygen(T0 + MIN, 'back', 200)]);
    const second = s.append([oxygen(T0 + 2 * MIN, 'back', 201)]);
    // Both appends resolve (nothing rejected): they waited for the disk, not dropped.
    await Promise.all([first, second]);
    expect(tries).toEqual([2, 2, 2]);
    expect((await s.query({ station: 'back' })).records.map((r) => r.o2_umol_kg)).toEqual([200, 201]);
    expect((await readFile(path.join(dir, 'records-2026-07-14.ndjson'), 'utf8')).split('\n')).toHaveLength(3);
    await s.close();
  });

  it('writes day files by event time and answers queries by type, station, transect and time', async () => {
    const { dir, s } = await store();
    await s.append([
      oxygen(T0 + 10 * MIN, 'back', 200),
      oxygen(T0 + 10 * MIN, 'flat', 210),
      flux(T0 + 15 * MIN, 5),
    ]);
    await s.append([oxygen(T0 + 86_400_000 + 5 * MIN, 'back', 190)]);
    expect((await readdir(dir)).sort()).toEqual(['records-2026-07-14.ndjson', 'records-2026-07-15.ndjson']);
    expect((await s.query({ station: 'back' })).records.map((r) => r.o2_umol_kg)).toEqual([200, 190]);
    expect((await s.query({ type: 'flux' })).records.map((r) => r.ncp_mmol_m2_h)).toEqual([5]);
    expect((await s.query({ transect: 'inner' })).records).toHaveLength(1);
    const day2 = await s.query({ fromMs: T0 + 86_400_000, toMs: T0 + 2 * 86_400_000 });
    expect(day2.records.map((r) => r.t)).toEqual(['2026-07-15T00:05:00.000Z']);
    expect((await s.query({ fromMs: T0 + 10 * MIN, toMs: T0 + 15 * MIN })).records).toHaveLength(2); // to is exclusive
    expect(await s.span()).toEqual({ first: '2026-07-14', last: '2026-07-15' });
    await s.close();
  });

  it('a later revision replaces the record; a repeated delivery is answered once', async () => {
    const { s } = await store();
    await s.append([flux(T0, 5), flux(T0 + 10 * MIN, 6)]);
    await s.append([flux(T0, 7.5, { revision: 1 }), flux(T0 + 10 * MIN, 6)]);
    await s.append([flux(T0, 5)]); // a stale copy of revision 0 arriving late does not win
    const r = await s.query({ type: 'flux' });
    expect(r.records.map((x) => [x.t, x.ncp_mmol_m2_h, x.revision])).toEqual([
      ['2026-07-14T00:00:00.000Z', 7.5, 1],
      ['2026-07-14T00:10:00.000Z', 6, undefined],
    ]);
    await s.close();
  });

  it('pages through days in time order with a cursor that survives appends', async () => {
    const { s } = await store();
    const all = Array.from({ length: 50 }, (_, i) => oxygen(T0 + i * 61 * MIN, 'back', i)); // ~2 days
    await s.append(all.slice().reverse());
    const seen: number[] = [];
    let cursor: string | undefined;
    let pages = 0;
    do {
      const page = await s.query({ station: 'back', limit: 7, ...(cursor ? { cursor } : {}) });
      expect(page.records.length).toBeLessThanOrEqual(7);
      seen.push(...page.records.map((r) => r.o2_umol_kg as number));
      cursor = page.next;
      if (pages === 2) await s.append([oxygen(T0 - MIN, 'back', -1)]); // an earlier record appears meanwhile
      pages++;
    } while (cursor !== undefined);
    expect(seen).toEqual(all.map((_, i) => i));
    expect(pages).toBe(8);
    await expect(s.query({ cursor: 'garbage' })).rejects.toThrow(RecordStoreError);
    await expect(s.query({ limit: 0 })).rejects.toThrow(/limit must be an integer from 1 to 10000/);
    await s.close();
  });

  it('skips a line cut short by a crash and starts the next append on a new line', async () => {
    const { dir, s } = await store();
    await s.append([oxygen(T0, 'back', 1)]);
    await appendFile(path.join(dir, 'records-2026-07-14.ndjson'), '{"type":"oxygen","site":"s","t":"2026-07');
    await s.append([oxygen(T0 + MIN, 'back', 2)]);
    expect((await s.query({})).records.map((r) => r.o2_umol_kg)).toEqual([1, 2]);
    expect((await readFile(path.join(dir, 'records-2026-07-14.ndjson'), 'utf8')).split('\n')).toHaveLength(4);
    await s.close();
  });

  it('removes days past the retention, and the oldest days past the size bound (never the newest)', async () => {
    const { dir, s } = await store({ retentionDays: 2, now: T0 + 5 * 86_400_000 });
    for (let d = 0; d <= 5; d++) await s.append([oxygen(T0 + d * 86_400_000, 'back', d)]);
    expect(await s.maintain()).toEqual([
      'records-2026-07-14.ndjson',
      'records-2026-07-15.ndjson',
      'records-2026-07-16.ndjson',
    ]);
    expect((await readdir(dir)).length).toBe(3);
    await s.close();
    const b = await store({ maxTotalMb: 200 / (1024 * 1024) }); // 200 bytes: about one day of these
    for (let d = 0; d < 4; d++) await b.s.append([oxygen(T0 + d * 86_400_000, 'back', d)]);
    const removed = await b.s.maintain();
    expect(removed.length).toBeGreaterThanOrEqual(2);
    expect(await readdir(b.dir)).toContain('records-2026-07-17.ndjson');
    await b.s.close();
  });
});

describe('parseRecordQuery', () => {
  it('reads the contract parameters and refuses bad ones with a reason', () => {
    const ok = parseRecordQuery(
      new URLSearchParams(
        'type=flux&transect=inner&from=2026-07-14T00:00:00Z&to=2026-07-15T00:00:00Z&limit=50',
      ),
    );
    expect(ok).toEqual({
      ok: true,
      query: { type: 'flux', transect: 'inner', fromMs: T0, toMs: T0 + 86_400_000, limit: 50 },
    });
    const bad = (s: string) => {
      const r = parseRecordQuery(new URLSearchParams(s));
      return r.ok ? '' : r.message;
    };
    expect(bad('type=fluxes')).toMatch(/^type must be one of waves, current/);
    expect(bad('from=yesterday')).toMatch(/from must be an ISO 8601 time/);
    expect(bad('from=2026-07-15T00:00:00Z&to=2026-07-14T00:00:00Z')).toBe('from must be before to');
    expect(bad('limit=100000')).toBe('limit must be an integer from 1 to 10000');
    expect(bad('site=x')).toMatch(/unknown parameter "site"/);
    expect(bad('station=../etc')).toMatch(/is not an id/);
  });
});
