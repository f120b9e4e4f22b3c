import { describe, it, expect, beforeEach, afterEach } from 'vitest';
import { mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Spool } from './spool.js';

let dir: string;
beforeEach(async () => {
  dir = await mkdtemp(join(tmpdir(), 'reefd-spool-'));
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

const entries = (from: number, n: number): string[] =>
  Array.from({ length: n }, (_, i) => `m v=${from + i} ${from + i}`);

async function drain(s: Spool, batch: number): Promise<string[]> {
  const out: string[] = [];
  for (;;) {
    const got = await s.peek(batch);
    if (got.length === 0) return out;
    out.push(...got);
    await s.commit(got.length);
  }
}

describe('spool', () => {
  it('replays entries in append order across many segments, then removes every segment', async () => {
    const s = await Spool.open({ dir, maxBytes: 1e6, segmentBytes: 200 });
    for (let i = 0; i < 20; i++) expect(await s.append(entries(i * 10, 10))).toBe(true);
    expect((await readdir(dir)).length).toBeGreaterThan(5);
    expect(s.lines()).toBe(200);
    expect(await drain(s, 7)).toEqual(entries(0, 200));
    expect(s.bytes()).toBe(0);
    expect(s.isEmpty()).toBe(true);
    expect(await readdir(dir)).toEqual([]);
  });

  it('keeps what was not delivered across close and reopen, oldest first', async () => {
    const a = await Spool.open({ dir, maxBytes: 1e6, segmentBytes: 100 });
    await a.append(entries(0, 30));
    await a.append(entries(30, 30));
    const first = await a.peek(10);
    await a.commit(first.length);
    await a.close();
    const b = await Spool.open({ dir, maxBytes: 1e6 });
    // The first segment was only partly delivered: it comes back whole (idempotent writes make this safe).
    expect(await drain(b, 1000)).toEqual(entries(0, 60));
  });

  it('refuses an append that would pass the size bound and keeps the oldest data', async () => {
    const s = await Spool.open({ dir, maxBytes: 80 });
    const e = entries(0, 6); // 6 lines of 8 bytes with their newline
    expect(await s.append(e)).toBe(true);
    expect(s.bytes()).toBe(Buffer.byteLength(e.join('\n') + '\n'));
    expect(s.nearLimit()).toBe(false);
    expect(await s.append(entries(6, 3))).toBe(true);
    expect(s.bytes()).toBe(72);
    expect(s.nearLimit()).toBe(true); // 72 >= 0.8 * 80
    expect(await s.append(entries(9, 3))).toBe(false); // 72 + 28 > 80
    expect(s.bytes()).toBe(72);
    expect(await drain(s, 100)).toEqual(entries(0, 9));
  });

  it('drops an entry cut short by a crash at the end of a segment', async () => {
    await writeFile(join(dir, 'seg-000000000001.spool'), 'a v=1 1\nb v=2 2\nc v=');
    const s = await Spool.open({ dir, maxBytes: 1e6 });
    expect(await drain(s, 10)).toEqual(['a v=1 1', 'b v=2 2']);
    expect(s.lines()).toBe(0);
    // New appends go to a new segment after the old ones.
    await s.append(['d v=4 4']);
    expect(await readdir(dir)).toEqual(['seg-000000000002.spool']);
  });
});
