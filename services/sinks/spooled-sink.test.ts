import { describe, it, expect, afterEach, vi } from 'vitest';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pino from 'pino';
import { ReefdError, type DerivedRecord } from '../../libs/contract/index.js';
import { createSpooledSink } from './spooled-sink.js';
import type { Sleep } from '../transport/backoff.js';
import { Spool } from './spool.js';

const dirs: string[] = [];
afterEach(async () => {
  vi.restoreAllMocks();
  for (const d of dirs.splice(0)) await rm(d, { recursive: true, force: true });
});

/** The spool's disk is full for its next `n` appends (REEFD_DISK_FULL, as Spool reports ENOSPC). */
function spoolDiskFull(n: number): { refused: () => number } {
  const real = Spool.prototype.append;
  let left = n;
  let refused = 0;
  vi.spyOn(Spool.prototype, 'append').mockImplementation(function (this: Spool, entries) {
    if (left > 0) {
      left--;
      refused++;
      return Promise.reject(
        new ReefdError('REEFD_DISK_FULL', 'No space left for the sink spool', { retriable: true }),
      );
    }
    return real.call(this, entries);
  });
  return { refused: () => refused };
}

const rec = (i: number): DerivedRecord => ({
  type: 'oxygen',
  site: 's',
  station: 'crest',
  t: new Date(Date.UTC(2026, 11, 2) + i * 1000).toISOString(),
  o2_umol_kg: i,
  o2_sat_pct: null,
  o2_mg_l: null,
});

interface Dest {
  got: number[];
  fail: number;
  refuseNext: boolean;
  calls: number;
  /** Answers this many more sends with refused credentials (HTTP 401). */
  authFail?: number;
}

async function make(
  dest: Dest,
  waits: number[],
  extra: { maxMemoryLines?: number; onAuth?: (failing: boolean) => void } = {},
) {
  const dir = await mkdtemp(join(tmpdir(), 'reefd-spooled-'));
  dirs.push(dir);
  // Sleeps are recorded and end at once: retries run without waiting.
  const sleep: Sleep = async (ms) => void waits.push(ms);
  return createSpooledSink({
    name: 'test',
    encode: (r) => ({ ok: true, entry: String((r as { o2_umol_kg: number }).o2_umol_kg) }),
    send: async (entries) => {
      dest.calls++;
      if (dest.refuseNext) {
        dest.refuseNext = false;
        throw new ReefdError('REEFD_SINK_UNAVAILABLE', 'HTTP 400', { retriable: false });
      }
      if (dest.fail > 0) {
        dest.fail--;
        throw new ReefdError('REEFD_SINK_UNAVAILABLE', 'HTTP 503', { retriable: true });
      }
      if ((dest.authFail ?? 0) > 0) {
        dest.authFail = (dest.authFail ?? 0) - 1;
        throw new ReefdError('REEFD_SINK_AUTH', 'HTTP 401', { retriable: true });
      }
      dest.got.push(...entries.map(Number));
    },
    batchSize: 10,
    flushMs: 5,
    logger: pino({ level: 'silent' }),
    sleep,
    random: () => 0.5,
    backoff: { baseMs: 100, maxMs: 1000 },
    spoolDir: dir,
    spoolMaxBytes: 1e6,
    ...extra,
  });
}

describe('spooled sink (injected destination and timers)', () => {
  it('spools on failure and delivers all entries once, in write order, with backoff between retries', async () => {
    const dest: Dest = { got: [], fail: 4, refuseNext: false, calls: 0 };
    const waits: number[] = [];
    const sink = await make(dest, waits);
    for (let i = 0; i < 95; i += 19) sink.write(Array.from({ length: 19 }, (_, k) => rec(i + k)));
    await sink.flush();
    await sink.close();
    expect(dest.got).toEqual(Array.from({ length: 95 }, (_, i) => i));
    // 95 entries in memory > 4 x batchSize: all go to the spool first; its head then fails 4 times,
    // waiting 50, 100, 200, 400 ms (full jitter with r = 0.5, base 100 ms).
    expect(waits).toEqual([50, 100, 200, 400]);
    expect(sink.stats()).toMatchObject({ written: 95, failed: 0, pending: 0, spoolBytes: 0 });
  });

  it('drops a refused batch and keeps going', async () => {
    const dest: Dest = { got: [], fail: 0, refuseNext: true, calls: 0 };
    const sink = await make(dest, []);
    sink.write(Array.from({ length: 25 }, (_, i) => rec(i)));
    await sink.close();
    expect(dest.got).toEqual(Array.from({ length: 15 }, (_, i) => 10 + i));
    expect(sink.stats()).toMatchObject({ written: 15, failed: 10 });
  });

  it('keeps memory bounded: past maxMemoryLines entries move to the spool, still in order', async () => {
    const dest: Dest = { got: [], fail: 1, refuseNext: false, calls: 0 };
    const sink = await make(dest, [], { maxMemoryLines: 20 });
    for (let i = 0; i < 200; i += 50) sink.write(Array.from({ length: 50 }, (_, k) => rec(i + k)));
    await sink.flush();
    await sink.close();
    expect(dest.got).toEqual(Array.from({ length: 200 }, (_, i) => i));
  });

  it('spools and retries while the credentials are refused, alerts once and clears once', async () => {
    const dest: Dest = { got: [], fail: 0, refuseNext: false, calls: 0, authFail: 3 };
    const auth: boolean[] = [];
    const sink = await make(dest, [], { onAuth: (f) => auth.push(f) });
    sink.write(Array.from({ length: 25 }, (_, i) => rec(i)));
    await sink.flush();
    await sink.close();
    expect(dest.got).toEqual(Array.from({ length: 25 }, (_, i) => i));
    expect(sink.stats()).toMatchObject({ written: 25, failed: 0 });
    expect(auth).toEqual([true, false]);
  });

  it('loses nothing when the spool disk is full while the destination fails: lines are held and retried', async () => {
    // The destination fails twice (as a delivery ledger on the same full disk does), the spool refuses
    // three appends: every entry still arrives once, in order, after backoff waits of at most 5 s.
    const full = spoolDiskFull(3);
    const dest: Dest = { got: [], fail: 2, refuseNext: false, calls: 0 };
    const waits: number[] = [];
    const sink = await make(dest, waits);
    sink.write(Array.from({ length: 25 }, (_, i) => rec(i)));
    await sink.flush();
    await sink.close();
    expect(full.refused()).toBeGreaterThanOrEqual(2);
    expect(dest.got).toEqual(Array.from({ length: 25 }, (_, i) => i));
    expect(sink.stats()).toMatchObject({ written: 25, failed: 0, pending: 0 });
    expect(waits.length).toBeGreaterThan(0);
    expect(Math.max(...waits)).toBeLessThanOrEqual(5000);
  });

  it('sends from memory instead of dropping when the spool disk is full and memory passes its bound', async () => {
    const full = spoolDiskFull(1000);
    const dest: Dest = { got: [], fail: 0, refuseNext: false, calls: 0 };
    const sink = await make(dest, [], { maxMemoryLines: 20 });
    for (let i = 0; i < 200; i += 50) sink.write(Array.from({ length: 50 }, (_, k) => rec(i + k)));
    await sink.flush();
    await sink.close();
    expect(full.refused()).toBeGreaterThan(0);
    expect(dest.got).toEqual(Array.from({ length: 200 }, (_, i) => i));
    expect(sink.stats()).toMatchObject({ written: 200, failed: 0 });
  });
});
