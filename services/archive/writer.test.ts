import { describe, it, expect, beforeEach, afterEach } from 'vitest';
import { mkdtemp, readFile, readdir, rm, writeFile, appendFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { archiveLine, ReefdError } from '../../libs/contract/index.js';
import { createArchiveWriter, readArchive } from './index.js';
import { openAppendFile, type OpenAppendFile } from './files.js';

const DEC2 = Date.UTC(2026, 11, 2, 12);
const DAY = 86_400_000;
let dir: string;

beforeEach(async () => {
  dir = await mkdtemp(join(tmpdir(), 'reefd-archive-'));
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

const line = (i: number, rxMs: number): string =>
  archiveLine(
    'reef/s/st/ctd/c1',
    new Date(rxMs).toISOString(),
    JSON.stringify({ v: 1, t: '2026-12-02T00:00:00Z', seq: i }),
  );

async function readAll(path: string): Promise<{ seqs: number[]; errors: string[] }> {
  const seqs: number[] = [];
  const errors: string[] = [];
  for await (const e of readArchive(path)) {
    if (e.line !== null) seqs.push((e.line.msg as { seq: number }).seq);
    else errors.push(`${e.file}:${e.lineNo}:${e.error ?? ''}`);
  }
  return { seqs, errors };
}

describe('archive writer', () => {
  it('group-commits: 200 concurrent appends share a handful of fsyncs and all land in order', async () => {
    const w = await createArchiveWriter({ dir, fsyncMs: 20, retentionDays: 0, clock: () => DEC2 });
    await Promise.all(Array.from({ length: 200 }, (_, i) => w.append(line(i, DEC2), DEC2)));
    const st = w.stats();
    expect(st.lines).toBe(200);
    expect(st.fsyncs).toBeLessThanOrEqual(2);
    await w.close();
    expect(await readdir(dir)).toEqual(['raw-2026-12-02.ndjson']);
    const { seqs } = await readAll(dir);
    expect(seqs).toEqual(Array.from({ length: 200 }, (_, i) => i));
  });

  it('names files by the UTC day of the receive time and rolls over at midnight, then compresses the closed day', async () => {
    let now = Date.UTC(2026, 11, 2, 23, 59, 59, 900);
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => now });
    await w.append(line(1, now), now);
    now += 200; // 2026-12-03T00:00:00.100Z
    await w.append(line(2, now), now);
    await w.maintain();
    expect((await readdir(dir)).sort()).toEqual(['raw-2026-12-02.ndjson.gz', 'raw-2026-12-03.ndjson']);
    const gz = gunzipSync(await readFile(join(dir, 'raw-2026-12-02.ndjson.gz'))).toString();
    expect(gz).toBe(line(1, Date.UTC(2026, 11, 2, 23, 59, 59, 900)) + '\n');
    await w.close();
    expect((await readAll(dir)).seqs).toEqual([1, 2]);
  });

  it('never reopens a closed day: a late line stamped yesterday goes to the open file', async () => {
    const now = DEC2 + DAY;
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => now });
    await w.append(line(1, now), now);
    await w.append(line(2, DEC2), DEC2);
    await w.close();
    expect(await readdir(dir)).toEqual(['raw-2026-12-03.ndjson']);
  });

  it('closes and compresses a day that ended without new appends; retention removes old days', async () => {
    let now = DEC2;
    await writeFile(join(dir, 'raw-2026-11-20.ndjson'), line(0, DEC2 - 12 * DAY) + '\n');
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 7, clock: () => now });
    await w.append(line(1, now), now);
    now += 2 * DAY;
    await w.maintain();
    // 2026-11-20 is more than 7 days before 2026-12-04: removed; 2026-12-02 closed and compressed.
    expect(await readdir(dir)).toEqual(['raw-2026-12-02.ndjson.gz']);
    await w.close();
  });

  it('starts a new line after a crash left a partial one; the reader reports and skips the partial line', async () => {
    await writeFile(join(dir, 'raw-2026-12-02.ndjson'), line(1, DEC2) + '\n' + line(2, DEC2).slice(0, 30));
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => DEC2 });
    await w.append(line(3, DEC2), DEC2);
    await w.close();
    const { seqs, errors } = await readAll(join(dir, 'raw-2026-12-02.ndjson'));
    expect(seqs).toEqual([1, 3]);
    expect(errors).toEqual(['raw-2026-12-02.ndjson:2:json_syntax']);
  });

  it('reader tolerates a truncated last line without a newline', async () => {
    const p = join(dir, 'raw-2026-12-02.ndjson');
    await writeFile(p, line(1, DEC2) + '\n');
    await appendFile(p, '{"topic":"reef/s');
    expect(await readAll(p)).toEqual({ seqs: [1], errors: ['raw-2026-12-02.ndjson:2:json_syntax'] });
  });

  it('rejects appends on a full disk with REEFD_DISK_FULL (retriable), leaving only whole lines', async () => {
    let full = false;
    const openFile: OpenAppendFile = async (path) => {
      const f = await openAppendFile(path);
      return {
        ...f,
        write: async (data) => {
          if (!full) return f.write(data);
          // Half the batch reaches the disk, then the device is full.
          await f.write(data.subarray(0, Math.floor(data.length / 2)));
          throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
        },
      };
    };
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => DEC2, openFile });
    await w.append(line(1, DEC2), DEC2);
    full = true;
    const err = await w.append(line(2, DEC2), DEC2).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ReefdError);
    expect((err as ReefdError).code).toBe('REEFD_DISK_FULL');
    expect((err as ReefdError).retriable).toBe(true);
    full = false;
    await w.append(line(3, DEC2), DEC2);
    await w.close();
    const text = await readFile(join(dir, 'raw-2026-12-02.ndjson'), 'utf8');
    expect(text).toBe(line(1, DEC2) + '\n' + line(3, DEC2) + '\n');
  });

  it('on start-up removes a half-written gz and keeps the plain file it came from', async () => {
    await writeFile(join(dir, 'raw-2026-12-01.ndjson'), line(1, DEC2 - DAY) + '\n');
    await writeFile(join(dir, 'raw-2026-12-01.ndjson.gz.tmp'), Buffer.from([0x1f, 0x8b, 0x08]));
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => DEC2 - DAY / 2 });
    expect(await readdir(dir)).toEqual(['raw-2026-12-01.ndjson']);
    await w.close();
    expect((await readAll(dir)).seqs).toEqual([1]);
  });

  it('reader reads a folder of plain and gz days in day order', async () => {
    let now = DEC2;
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => now });
    for (let d = 0; d < 3; d++) {
      await w.append(line(d, now), now);
      now += DAY;
    }
    await w.maintain();
    await w.close();
    expect((await readdir(dir)).sort()).toEqual([
      'raw-2026-12-02.ndjson.gz',
      'raw-2026-12-03.ndjson.gz',
      'raw-2026-12-04.ndjson.gz',
    ]);
    expect((await readAll(dir)).seqs).toEqual([0, 1, 2]);
  });
});

describe('archive writer commits on count, size or time', () => {
  it('commits as soon as maxBatchLines wait, without waiting for the timer', async () => {
    // fsync_ms at its configured maximum: were the count ignored, the appends would wait 10 s and the
    // test would time out.
    const w = await createArchiveWriter({
      dir,
      fsyncMs: 10_000,
      retentionDays: 0,
      clock: () => DEC2,
      maxBatchLines: 50,
    });
    await Promise.all(Array.from({ length: 120 }, (_, i) => w.append(line(i, DEC2), DEC2)));
    expect(w.stats().lines).toBe(120);
    // All 120 were appended in one turn of the event loop: one commit took them all.
    expect(w.stats().fsyncs).toBe(1);
    await w.close();
    expect((await readAll(dir)).seqs).toEqual(Array.from({ length: 120 }, (_, i) => i));
  });

  it('commits as soon as maxBatchBytes wait', async () => {
    const w = await createArchiveWriter({
      dir,
      fsyncMs: 10_000,
      retentionDays: 0,
      clock: () => DEC2,
      maxBatchBytes: 1000,
    });
    const big = (i: number) =>
      archiveLine(
        'reef/s/st/ctd/c1',
        new Date(DEC2).toISOString(),
        JSON.stringify({ seq: i, pad: 'x'.repeat(600) }),
      );
    await Promise.all([w.append(big(1), DEC2), w.append(big(2), DEC2)]);
    expect(w.stats()).toMatchObject({ lines: 2, fsyncs: 1 });
    await w.close();
  });

  it('holds fewer lines than the count for the timer, then commits them together', async () => {
    const w = await createArchiveWriter({
      dir,
      fsyncMs: 10_000,
      retentionDays: 0,
      clock: () => DEC2,
      maxBatchLines: 50,
    });
    let resolved = 0;
    const all = Array.from({ length: 10 }, (_, i) => w.append(line(i, DEC2), DEC2).then(() => resolved++));
    // Several turns of the event loop: nothing is committed before the timer or a trigger.
    for (let i = 0; i < 5; i++) await new Promise((r) => setImmediate(r));
    expect(resolved).toBe(0);
    expect(w.stats().fsyncs).toBe(0);
    await w.flush();
    await Promise.all(all);
    expect(w.stats()).toMatchObject({ lines: 10, fsyncs: 1 });
    await w.close();
  });

  it('takes the lines that arrive during a commit into the next one (batches grow with the fsync time)', async () => {
    let syncs = 0;
    let release: () => void = () => {};
    const openFile: OpenAppendFile = async (path) => {
      const f = await openAppendFile(path);
      return {
        ...f,
        sync: async () => {
          // The first fsync is held until 300 more lines are waiting.
          if (syncs++ === 0) await new Promise<void>((r) => (release = r));
          return f.sync();
        },
      };
    };
    const w = await createArchiveWriter({
      dir,
      fsyncMs: 10_000,
      retentionDays: 0,
      clock: () => DEC2,
      maxBatchLines: 10,
      openFile,
    });
    const first = Array.from({ length: 10 }, (_, i) => w.append(line(i, DEC2), DEC2));
    while (syncs === 0) await new Promise((r) => setImmediate(r));
    const more = Array.from({ length: 300 }, (_, i) => w.append(line(10 + i, DEC2), DEC2));
    release();
    await Promise.all([...first, ...more]);
    expect(w.stats()).toMatchObject({ lines: 310, fsyncs: 2 });
    await w.close();
    expect((await readAll(dir)).seqs).toEqual(Array.from({ length: 310 }, (_, i) => i));
  });
});

describe('archive writer, messages spliced from their bytes', () => {
  it('writes the payload as received and reads it back as the payload value', async () => {
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => DEC2 });
    const payloads = [
      '{"v":1,"t":"2026-12-02T00:00:00Z","seq":1}',
      '{\r\n  "v": 1,\n  "seq": 2.0e0 }',
      '{"seq":3}', // sent with a byte order mark
      'not json',
    ];
    const bytes = payloads.map((p, i) =>
      i === 2 ? Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(p)]) : Buffer.from(p),
    );
    await w.appendMessage({ topic: 'reef/s/st/ctd/c1', rxMs: DEC2, payload: bytes[0]!, json: true });
    await w.appendMessage({
      topic: 'reef/s/st/ctd/c1',
      rxMs: DEC2,
      payload: bytes[1]!,
      json: true,
      reject: 'x:y',
    });
    await w.appendMessage({ topic: 'reef/s/st/ctd/c1', rxMs: DEC2, payload: bytes[2]!, json: true });
    await w.appendMessage({ topic: 'reef/s/st/ctd/c1', rxMs: DEC2, payload: bytes[3]!, json: false });
    await w.close();
    const text = await readFile(join(dir, 'raw-2026-12-02.ndjson'), 'utf8');
    expect(text.split('\n')[0]).toBe(
      archiveLine('reef/s/st/ctd/c1', new Date(DEC2).toISOString(), payloads[0]!),
    );
    const got = [];
    for await (const e of readArchive(dir)) got.push(e.line);
    expect(got).toEqual([
      {
        topic: 'reef/s/st/ctd/c1',
        rx: new Date(DEC2).toISOString(),
        msg: { v: 1, t: '2026-12-02T00:00:00Z', seq: 1 },
      },
      { topic: 'reef/s/st/ctd/c1', rx: new Date(DEC2).toISOString(), msg: { v: 1, seq: 2 }, reject: 'x:y' },
      { topic: 'reef/s/st/ctd/c1', rx: new Date(DEC2).toISOString(), msg: { seq: 3 } },
      { topic: 'reef/s/st/ctd/c1', rx: new Date(DEC2).toISOString(), msg: 'not json' },
    ]);
  });
});

describe('archive writer and compressed days', () => {
  it('never writes into a day that is already compressed, even for a line stamped with it', async () => {
    const { gzipSync } = await import('node:zlib');
    await writeFile(join(dir, 'raw-2026-12-02.ndjson.gz'), gzipSync(line(1, DEC2) + '\n'));
    // Restarted with a clock still on 2026-12-02 (e.g. compressed by an earlier run after a clock fix).
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => DEC2 });
    await w.append(line(2, DEC2), DEC2);
    await w.close();
    expect((await readdir(dir)).sort()).toEqual(['raw-2026-12-02.ndjson.gz', 'raw-2026-12-03.ndjson']);
    expect((await readAll(dir)).seqs).toEqual([1, 2]);
  });

  it('reads a truncated gz up to the cut and reports the damage', async () => {
    const { gzipSync } = await import('node:zlib');
    const text = Array.from({ length: 2000 }, (_, i) => line(i, DEC2)).join('\n') + '\n';
    const gz = gzipSync(text);
    await writeFile(join(dir, 'raw-2026-12-01.ndjson.gz'), gz.subarray(0, Math.floor(gz.length / 2)));
    const { seqs, errors } = await readAll(dir);
    expect(seqs.length).toBeGreaterThan(100);
    expect(seqs).toEqual(Array.from({ length: seqs.length }, (_, i) => i));
    expect(errors.length).toBeGreaterThanOrEqual(1);
    expect(errors.at(-1)).toMatch(/^raw-2026-12-01\.ndjson\.gz:\d+:gzip:/);
  });
});
