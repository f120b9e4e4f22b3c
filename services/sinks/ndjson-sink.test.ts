// The NDJSON file output across a crash: the length and last position it committed after an fsync are what
// survives; a tail written after the last commit (records, or half a line) is cut at the next start, and
// the records derived again are appended once.
import { appendFile, mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { createNdjsonSink } from './ndjson-sink.js';

const dirs: string[] = [];
afterEach(async () => {
  for (const d of dirs.splice(0)) await rm(d, { recursive: true, force: true });
});

const rec = (i: number): DerivedRecord => ({
  type: 'oxygen',
  site: 's',
  station: 'crest',
  t: new Date(Date.UTC(2026, 11, 2) + i * 60_000).toISOString(),
  o2_umol_kg: 200 + i,
  o2_sat_pct: null,
  o2_mg_l: null,
});
const recs = (from: number, n: number) => Array.from({ length: n }, (_, k) => rec(from + k));

async function setup() {
  const dir = await mkdtemp(join(tmpdir(), 'reefd-ndjson-'));
  dirs.push(dir);
  return { file: join(dir, 'records.ndjson'), ledger: join(dir, 'outputs', 'ndjson.json') };
}

const readRecords = async (file: string) =>
  (await readFile(file, 'utf8'))
    .split('\n')
    .filter((l) => l !== '')
    .map((l) => (JSON.parse(l) as { o2_umol_kg: number }).o2_umol_kg - 200);

describe('ndjson output with a ledger', () => {
  it('cuts what was written after the last commit and appends the derived-again records once', async () => {
    const { file, ledger } = await setup();
    const a = await createNdjsonSink({ path: file, ledger: { file: ledger, epoch: 'e1', commitMs: 60_000 } });
    a.write(recs(0, 10), 0);
    await a.flush(); // committed: positions 0..9
    // A crash after more records reached the file but before their commit, the last line half written.
    await appendFile(file, JSON.stringify(rec(10)) + '\n' + JSON.stringify(rec(11)).slice(0, 20));
    expect(JSON.parse(await readFile(ledger, 'utf8'))).toMatchObject({ epoch: 'e1', pos: 9 });

    const b = await createNdjsonSink({ path: file, ledger: { file: ledger, epoch: 'e1', commitMs: 60_000 } });
    // The restart derives from the checkpoint (position 5 here) again: 5..9 are held, 10..14 are new.
    b.write(recs(5, 10), 5);
    await b.close();
    expect(await readRecords(file)).toEqual([...Array(15).keys()]);
    expect(b.stats()).toMatchObject({ skipped: 5 });
  });

  it('keeps a file of another stream as it is and skips nothing', async () => {
    const { file, ledger } = await setup();
    await writeFile(file, JSON.stringify(rec(99)) + '\n');
    await mkdir(join(ledger, '..'), { recursive: true });
    await writeFile(ledger, JSON.stringify({ epoch: 'old', pos: 1000, bytes: 3 }));
    const s = await createNdjsonSink({
      path: file,
      ledger: { file: ledger, epoch: 'new', commitMs: 60_000 },
    });
    s.write(recs(0, 3), 0);
    await s.close();
    expect(await readRecords(file)).toEqual([99, 0, 1, 2]);
    expect(JSON.parse(await readFile(ledger, 'utf8'))).toMatchObject({ epoch: 'new', pos: 2 });
  });

  it('commits on its own timer while records arrive (no checkpoint needed)', async () => {
    const { file, ledger } = await setup();
    const s = await createNdjsonSink({ path: file, ledger: { file: ledger, epoch: 'e', commitMs: 20 } });
    s.write(recs(0, 4), 0);
    const end = Date.now() + 5000;
    let committed: { pos?: number } = {};
    while (committed.pos !== 3 && Date.now() < end) {
      await new Promise((r) => setTimeout(r, 20));
      committed = JSON.parse(await readFile(ledger, 'utf8').catch(() => '{}')) as { pos?: number };
    }
    expect(committed.pos).toBe(3);
    await s.close();
  });

  it('writes records without positions as they come (replay, shore)', async () => {
    const { file } = await setup();
    const s = await createNdjsonSink({ path: file });
    s.write(recs(0, 2));
    s.write(recs(0, 2));
    await s.close();
    expect(await readRecords(file)).toEqual([0, 1, 0, 1]);
  });
});
