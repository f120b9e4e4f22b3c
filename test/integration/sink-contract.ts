// The contract every RecordSink passes (services/pipeline/types.ts): everything flushed arrives, order is
// kept, close then reopen loses nothing, and writes are idempotent.
//
// Two kinds of destination: `upsert` ones (databases: a point is identified by series and time, a second
// write overwrites it) and `log` ones (NDJSON file, Kafka topic: every write is appended). For an upsert
// destination "order kept" means the last write of a (series, t) wins, and "idempotent" means writing a
// batch twice leaves the count unchanged. For a log destination the read-back sequence per series equals
// the write sequence, and a batch written twice appears twice with the same keys, so a reader that keeps
// the last value per (series, t) sees the same state.
import { describe, it, expect, beforeEach, afterEach } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { RecordSink } from '../../services/pipeline/types.js';
import { pollUntil, randomSuffix } from './env.js';

export interface ContractContext {
  /** Fresh per test: use it in database, topic, file and site names. */
  id: string;
  /** The site id the records carry (`it_<id>`), also unique per test. */
  site: string;
}

/** One record as read back from the destination. */
export interface ReadBackItem {
  station: string;
  t: string;
  /** The index the test gave the record (from o2_umol_kg). */
  index: number;
  /** The write version (from o2_sat_pct). */
  version: number;
}

export interface SinkContractOptions {
  semantics: 'upsert' | 'dedup' | 'log';
  cleanup?: (ctx: ContractContext) => Promise<void>;
  /** How long read-back polls for the expected count (default 20 s). */
  timeoutMs?: number;
}

const T0 = Date.UTC(2026, 10, 20);

/** Records for two stations, index i at minute i; o2_sat_pct carries the version. */
export function contractRecords(site: string, from: number, n: number, version = 0): DerivedRecord[] {
  return Array.from({ length: n }, (_, k) => {
    const i = from + k;
    return {
      type: 'oxygen',
      site,
      station: i % 2 === 0 ? 'crest' : 'back',
      t: new Date(T0 + i * 60_000).toISOString(),
      o2_umol_kg: 200 + i / 1000,
      o2_sat_pct: 90 + version,
      o2_mg_l: null,
    };
  });
}

export function readBackItem(station: string, tMs: number, o2UmolKg: number, o2SatPct: number): ReadBackItem {
  return {
    station,
    t: new Date(tMs).toISOString(),
    index: Math.round((o2UmolKg - 200) * 1000),
    version: Math.round(o2SatPct - 90),
  };
}

const keyOf = (x: { station: string; t: string }): string => `${x.station}|${x.t}`;

function expected(recs: DerivedRecord[]): ReadBackItem[] {
  return recs.map((r) => {
    const o = r as { station: string; t: string; o2_umol_kg: number; o2_sat_pct: number };
    return readBackItem(o.station, Date.parse(o.t), o.o2_umol_kg, o.o2_sat_pct);
  });
}

/** Last write per (series, t), in key order. */
function lastWins(items: ReadBackItem[]): ReadBackItem[] {
  const m = new Map<string, ReadBackItem>();
  for (const it of items) m.set(keyOf(it), it);
  return [...m.values()].sort((a, b) => keyOf(a).localeCompare(keyOf(b)));
}

function perStation(items: ReadBackItem[]): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const it of items) (out[it.station] ??= []).push(`${it.index}@${it.version}`);
  return out;
}

export function runSinkContract(
  name: string,
  makeSink: (ctx: ContractContext) => Promise<RecordSink>,
  readBack: (ctx: ContractContext) => Promise<ReadBackItem[]>,
  opts: SinkContractOptions,
): void {
  describe(`RecordSink contract: ${name}`, () => {
    let ctx: ContractContext;
    const timeout = opts.timeoutMs ?? 20_000;
    beforeEach(() => {
      const id = randomSuffix();
      ctx = { id, site: `it_${id}` };
    });
    afterEach(async () => {
      await opts.cleanup?.(ctx);
    });

    const readCount = (n: number): Promise<ReadBackItem[]> =>
      pollUntil(
        `${n} records read back from ${name}`,
        async () => {
          const got = await readBack(ctx);
          return got.length >= n ? got : undefined;
        },
        timeout,
        200,
      );

    it('delivers everything that was flushed, with its values', async () => {
      const sink = await makeSink(ctx);
      const recs = contractRecords(ctx.site, 0, 250);
      for (let i = 0; i < 250; i += 50) sink.write(recs.slice(i, i + 50));
      await sink.flush();
      expect(sink.stats().pending).toBe(0);
      const got = await readCount(250);
      expect(lastWins(got)).toEqual(lastWins(expected(recs)));
      expect(got.length).toBe(250);
      await sink.close();
      expect(sink.stats().written).toBe(250);
      expect(sink.stats().failed).toBe(0);
    });

    it(
      opts.semantics === 'dedup'
        ? 'keeps one sample per point (write order not observable)'
        : 'keeps the write order',
      async () => {
        const sink = await makeSink(ctx);
        // Versions 0, 1, 2 of the same 40 points, written one after the other in small writes.
        const all: DerivedRecord[] = [];
        for (let v = 0; v < 3; v++) {
          const recs = contractRecords(ctx.site, 0, 40, v);
          all.push(...recs);
          for (let i = 0; i < 40; i += 7) sink.write(recs.slice(i, i + 7));
        }
        await sink.flush();
        await sink.close();
        if (opts.semantics === 'dedup') {
          const got = await readCount(40);
          await new Promise((r) => setTimeout(r, 300));
          // One sample per point, of one of the written versions.
          expect((await readBack(ctx)).length).toBe(40);
          expect(got.every((g) => g.version >= 0 && g.version <= 2)).toBe(true);
          expect(new Set(got.map(keyOf)).size).toBe(40);
        } else if (opts.semantics === 'upsert') {
          const got = await readCount(40);
          // The last write of each point wins only if the writes arrived in order.
          await new Promise((r) => setTimeout(r, 300));
          expect(lastWins(await readBack(ctx))).toEqual(
            lastWins(expected(contractRecords(ctx.site, 0, 40, 2))),
          );
          expect(got.every((g) => g.version === 2)).toBe(true);
        } else {
          const got = await readCount(120);
          expect(perStation(got)).toEqual(perStation(expected(all)));
        }
      },
    );

    it('loses nothing across close and reopen', async () => {
      const a = await makeSink(ctx);
      a.write(contractRecords(ctx.site, 0, 100));
      await a.close(); // no flush first: close must flush
      const b = await makeSink(ctx);
      b.write(contractRecords(ctx.site, 100, 50));
      await b.close();
      const got = await readCount(150);
      expect(lastWins(got)).toEqual(lastWins(expected(contractRecords(ctx.site, 0, 150))));
      expect(got.length).toBe(150);
    });

    it('is idempotent: the same batch written twice leaves the same state', async () => {
      const sink = await makeSink(ctx);
      const recs = contractRecords(ctx.site, 0, 60);
      sink.write(recs);
      await sink.flush();
      sink.write(recs);
      await sink.flush();
      await sink.close();
      const want = opts.semantics === 'log' ? 120 : 60;
      const got = await readCount(want);
      await new Promise((r) => setTimeout(r, 300));
      const again = await readBack(ctx);
      expect(again.length).toBe(want);
      expect(got.length).toBe(want);
      expect(lastWins(again)).toEqual(lastWins(expected(recs)));
    });
  });
}
