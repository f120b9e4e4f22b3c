import { mkdtemp, readdir, readFile, writeFile, appendFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { derivedRecordSchema, type DerivedRecord } from '../../libs/contract/index.js';
import { RecordHistory } from './history.js';
import { HistoryLog } from './history-log.js';

const MIN = 60_000;
const HOUR = 60 * MIN;
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();
const oxygen = (tMs: number, mgL: number, flag = 1, sensor = 'o2-lagoon'): DerivedRecord =>
  ({
    type: 'oxygen',
    site: 'ornen-reef',
    t: iso(tMs),
    station: 'lagoon',
    sensor,
    o2_umol_kg: mgL * 31.2,
    o2_sat_pct: null,
    o2_mg_l: mgL,
    flag,
  }) as DerivedRecord;
const flux = (tMs: number, valid: boolean, reasons = ''): DerivedRecord => ({
  type: 'flux',
  site: 'ornen-reef',
  t: iso(tMs),
  transect: 'inner',
  ncp_mmol_m2_h: valid ? 12.5 : null,
  nec_mmol_m2_h: valid ? 3.25 : null,
  nec_method: valid ? 'inverse' : null,
  u_m_s: 0.08,
  depth_m: 1.4,
  residence_min: 35,
  valid,
  ncp_significant: valid,
  nec_significant: false,
  ...(reasons ? { invalid_reasons: reasons } : {}),
});

describe('RecordHistory (downsampled, bounded)', () => {
  it('keeps one record per bucket: the worst flag, else the newest', () => {
    const h = new RecordHistory({ resolutionMs: 10 * MIN });
    h.add([oxygen(T0, 5.0), oxygen(T0 + 5 * MIN, 4.0)]);
    expect(h.records().map((r) => (r as { o2_mg_l: number }).o2_mg_l)).toEqual([4.0]); // newest of the bucket
    h.add([oxygen(T0 + 2 * MIN, 9.9, 4)]);
    h.add([oxygen(T0 + 7 * MIN, 4.1, 3)]); // suspect does not displace a fail
    const kept = h.records();
    expect(kept).toHaveLength(1);
    expect(kept[0]).toMatchObject({ t: iso(T0 + 2 * MIN), o2_mg_l: 9.9, flag: 4 });
    // The newest record is kept whole for the numbers beside the plots.
    expect(h.latest()[0]).toMatchObject({ t: iso(T0 + 7 * MIN), o2_mg_l: 4.1, flag: 3 });
  });

  it('keeps an invalid flux window (with its reason) over a valid one of the same bucket', () => {
    const h = new RecordHistory({ resolutionMs: 10 * MIN });
    h.add([flux(T0 + 5 * MIN, false, 'storage_dominates'), flux(T0 + 6 * MIN, true)]);
    expect(h.records()[0]).toMatchObject({
      valid: false,
      invalid_reasons: 'storage_dominates',
      ncp_mmol_m2_h: null,
    });
  });

  it('rebuilds records the contract schema accepts: nulls stay null, absent fields stay absent', () => {
    const h = new RecordHistory();
    h.add([flux(T0, false, 'input_missing'), flux(T0 + HOUR, true)]);
    const [a, b] = h.records();
    expect(derivedRecordSchema.safeParse(a).success).toBe(true);
    expect(derivedRecordSchema.safeParse(b).success).toBe(true);
    expect(a).toMatchObject({ nec_method: null, ncp_mmol_m2_h: null, invalid_reasons: 'input_missing' });
    expect(b).not.toHaveProperty('invalid_reasons');
    expect(b).toMatchObject({ nec_method: 'inverse', ncp_mmol_m2_h: 12.5, nec_mmol_m2_h: 3.25 });
  });

  it('is bounded by window / resolution whatever the rate and the duration', () => {
    const h = new RecordHistory({ windowMs: 48 * HOUR, resolutionMs: 10 * MIN });
    // 4 days of one-minute records from two sensors of a kind at one station.
    const batch: DerivedRecord[] = [];
    for (let i = 0; i < 4 * 24 * 60; i++) {
      batch.push(oxygen(T0 + i * MIN, 5 + Math.sin(i / 100)), oxygen(T0 + i * MIN, 6, 1, 'o2-lagoon-b'));
    }
    const bytesAfterOneDay = (() => {
      const g = new RecordHistory({ windowMs: 48 * HOUR, resolutionMs: 10 * MIN });
      g.add(batch.slice(0, 2 * 24 * 60));
      return g.columnBytes;
    })();
    h.add(batch);
    expect(h.seriesCount).toBe(2); // two sensors never share a series
    expect(h.size).toBe(2 * (48 * 6 + 1));
    expect(h.columnBytes).toBe(bytesAfterOneDay); // no growth with time
    const kept = h.records({ sensor: 'o2-lagoon' });
    expect(Date.parse(kept[0]!.t)).toBeGreaterThanOrEqual(h.latestMs - 48 * HOUR);
    expect(kept.at(-1)!.t).toBe(iso(T0 + (4 * 24 * 60 - 1) * MIN));
    expect(kept.every((r, i) => i === 0 || r.t > kept[i - 1]!.t)).toBe(true);
  });

  it('reports each bucket once it is final, and again when a late record changes a closed bucket', () => {
    const final: DerivedRecord[] = [];
    const h = new RecordHistory({ resolutionMs: 10 * MIN, onFinal: (r) => final.push(...r) });
    h.add([oxygen(T0, 5), oxygen(T0 + 5 * MIN, 5.5)]);
    expect(final).toEqual([]); // the bucket is still open
    h.add([oxygen(T0 + 10 * MIN, 6)]);
    expect(final.map((r) => r.t)).toEqual([iso(T0 + 5 * MIN)]);
    h.add([oxygen(T0 + 3 * MIN, 1.1, 4)]); // late, and worse: the closed bucket's record changes
    expect(final.map((r) => r.t)).toEqual([iso(T0 + 5 * MIN), iso(T0 + 3 * MIN)]);
    h.add([oxygen(T0 + 4 * MIN, 7)]); // late but not worse: nothing to report
    expect(final).toHaveLength(2);
    expect(h.openBuckets().map((r) => r.t)).toEqual([iso(T0 + 10 * MIN)]);
  });
});

describe('HistoryLog (saved incrementally)', () => {
  it('appends only what became final since the last save, and reads it back into the same history', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-hist-'));
    const log = new HistoryLog({ dir, windowMs: 48 * HOUR });
    const h = new RecordHistory({ resolutionMs: 10 * MIN, onFinal: (r) => log.append(r) });
    for (let i = 0; i < 6 * 12; i++) h.add([oxygen(T0 + i * 5 * MIN, 5 + i / 100)]);
    await log.save();
    const first = log.stats;
    expect(first.savedLines).toBe(6 * 6 - 1); // every bucket but the open one
    for (let i = 6 * 12; i < 6 * 12 + 4; i++) h.add([oxygen(T0 + i * 5 * MIN, 6)]);
    await log.save();
    expect(log.stats.savedLines - first.savedLines).toBe(2); // the next save writes the new buckets only
    expect((await readdir(dir)).sort()).toEqual([
      '20260301T00.ndjson',
      '20260301T01.ndjson',
      '20260301T02.ndjson',
      '20260301T03.ndjson',
      '20260301T04.ndjson',
      '20260301T05.ndjson',
      '20260301T06.ndjson',
    ]);
    log.append(h.openBuckets());
    await log.save();
    // A crash mid-append leaves a torn line: it is skipped.
    await appendFile(path.join(dir, '20260301T06.ndjson'), '{"type":"oxy');
    const back = new RecordHistory({ resolutionMs: 10 * MIN });
    const n = await new HistoryLog({ dir, windowMs: 48 * HOUR }).load((b) => back.add(b, true));
    expect(n).toBe(h.size);
    expect(back.records()).toEqual(h.records());
  });

  it('deletes segments older than the window', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-hist-'));
    await writeFile(
      path.join(dir, '20260225T00.ndjson'),
      JSON.stringify(oxygen(Date.UTC(2026, 1, 25), 5)) + '\n',
    );
    await writeFile(path.join(dir, 'notes.txt'), 'kept');
    const log = new HistoryLog({ dir, windowMs: 48 * HOUR });
    log.append([oxygen(T0 + 30 * MIN, 5)]);
    await log.save();
    expect((await readdir(dir)).sort()).toEqual(['20260301T00.ndjson', 'notes.txt']);
    expect(await readFile(path.join(dir, '20260301T00.ndjson'), 'utf8')).toContain('"o2_mg_l":5');
  });
});
