// The durable record history behind `GET /api/records` (docs/contract-v1.md, HTTP): every derived record
// appended to a day file of its event time (`<dir>/records-YYYY-MM-DD.ndjson`, UTC day of `t`), in group
// commits (one fsync per batch, within fsyncMs), with retention by days and by total size. Queries stream
// the day files of the range one at a time, keep the latest revision of each record (record-types.ts
// recordKey), and page in (t, identity) order with an opaque cursor, so memory is bounded by one day's
// matches and a page, whatever the history holds. A crash can cut the last line of a file short: readers
// skip it and the next append starts a new line. A full disk loses nothing: the lines wait in memory, in
// order, and are written again after a backoff (at most 5 s); appends resolve once they are on disk. The
// intake stops on the same full disk (the archive refuses), so what waits is bounded.
import { mkdir, open, readdir, rm, stat } from 'node:fs/promises';
import { createReadStream } from 'node:fs';
import path from 'node:path';
import { createInterface } from 'node:readline';
import {
  derivedRecordSchema,
  recordKey,
  ReefdError,
  type DerivedRecord,
  type RecordType,
} from '../../libs/contract/index.js';
import { RECORDS_ERRORS, type RecordsErrorCode } from './errors.js';

const DAY_MS = 86_400_000;
const FILE = /^records-(\d{4}-\d{2}-\d{2})\.ndjson$/;

export interface RecordStoreOptions {
  dir: string;
  /** Day files whose day ended more than this many days before the clock's day are removed; 0 keeps all. */
  retentionDays: number;
  /** The oldest days are removed while the files add up to more than this; 0 = no bound. */
  maxTotalMb?: number;
  /** Longest an append waits for its fsync (group commit). */
  fsyncMs?: number;
  clock: () => number;
  /** Appends lines to a day file and fsyncs it (injected by tests, e.g. a full disk). */
  appendLines?: (file: string, lines: readonly string[]) => Promise<void>;
}

export interface RecordQuery {
  type?: RecordType;
  station?: string;
  transect?: string;
  /** Inclusive start and exclusive end of `t`, ms. */
  fromMs?: number;
  toMs?: number;
  /** Page size (default 1000, at most MAX_PAGE). */
  limit?: number;
  /** The `next` of the previous page. */
  cursor?: string;
}

export interface RecordPage {
  records: DerivedRecord[];
  /** Give it back as `cursor` for the next page; absent on the last page. */
  next?: string;
}

export const MAX_PAGE = 10_000;

export interface RecordStore {
  /** Appends records; resolves once they are on disk (fsynced). */
  append(records: readonly DerivedRecord[]): Promise<void>;
  query(q: RecordQuery): Promise<RecordPage>;
  /** Applies retention now (also run once a day by the caller's timer). Returns the files removed. */
  maintain(): Promise<string[]>;
  flush(): Promise<void>;
  close(): Promise<void>;
  /** Earliest and latest day held, `YYYY-MM-DD`, or undefined when empty. */
  span(): Promise<{ first: string; last: string } | undefined>;
}

const dayName = (ms: number): string => new Date(Math.floor(ms / DAY_MS) * DAY_MS).toISOString().slice(0, 10);
const fileOf = (day: string): string => `records-${day}.ndjson`;

interface Cursor {
  t: number;
  k: string;
}
const encodeCursor = (c: Cursor): string => Buffer.from(JSON.stringify(c)).toString('base64url');
function decodeCursor(s: string): Cursor | undefined {
  try {
    const c = JSON.parse(Buffer.from(s, 'base64url').toString('utf8')) as Partial<Cursor>;
    return typeof c.t === 'number' && typeof c.k === 'string' ? { t: c.t, k: c.k } : undefined;
  } catch {
    return undefined;
  }
}

/** A query the store cannot answer (bad limit or cursor); never retriable. */
export class RecordStoreError extends ReefdError<RecordsErrorCode> {
  constructor(what: string) {
    const code = 'REEFD_RECORDS_BAD_QUERY';
    super(code, `${what}`, { detail: { hint: RECORDS_ERRORS.text(code) } });
    this.name = 'RecordStoreError';
  }
}

/** True when the record is one the query asks for (the time range is checked by the caller). */
function matches(r: DerivedRecord, q: RecordQuery): boolean {
  if (q.type !== undefined && r.type !== q.type) return false;
  const rec = r as Record<string, unknown>;
  if (q.station !== undefined && rec.station !== q.station) return false;
  if (q.transect !== undefined && rec.transect !== q.transect) return false;
  return true;
}

class Store implements RecordStore {
  readonly #o: RecordStoreOptions;
  #queue: { day: string; line: string }[] = [];
  #waiters: { resolve: () => void; reject: (e: Error) => void }[] = [];
  #timer: NodeJS.Timeout | undefined;
  #chain: Promise<void> = Promise.resolve();
  #closing = false;
  #closed = false;
  /** Commits in a row that found the disk full. */
  #fullAttempts = 0;

  constructor(o: RecordStoreOptions) {
    this.#o = o;
  }

  append(records: readonly DerivedRecord[]): Promise<void> {
    if (this.#closed) return Promise.reject(new Error('record store is closed'));
    for (const r of records) {
      const t = Date.parse(r.t);
      if (!Number.isFinite(t)) continue;
      this.#queue.push({ day: dayName(t), line: JSON.stringify(r) });
    }
    return new Promise<void>((resolve, reject) => {
      this.#waiters.push({ resolve, reject });
      if (this.#timer === undefined) {
        this.#timer = setTimeout(() => {
          this.#timer = undefined;
          void this.#commit();
        }, this.#o.fsyncMs ?? 200);
      }
    });
  }

  #commit(): Promise<void> {
    const next = this.#chain.then(() => this.#commitNow());
    this.#chain = next.catch(() => undefined);
    return next;
  }

  async #commitNow(): Promise<void> {
    const queue = this.#queue;
    const waiters = this.#waiters;
    this.#queue = [];
    this.#waiters = [];
    try {
      const byDay = new Map<string, string[]>();
      for (const q of queue) byDay.set(q.day, [...(byDay.get(q.day) ?? []), q.line]);
      const write = this.#o.appendLines ?? appendLines;
      for (const [day, lines] of byDay) await write(path.join(this.#o.dir, fileOf(day)), lines);
      this.#fullAttempts = 0;
      for (const w of waiters) w.resolve();
    } catch (err) {
      if (isDiskFull(err) && !this.#closing) {
        // Nothing is lost: the lines go back in front of newer ones and are written again later (a day
        // written before the failure is written twice, which queries see as one: latest revision wins).
        this.#queue = [...queue, ...this.#queue];
        this.#waiters = [...waiters, ...this.#waiters];
        this.#commitLater(Math.min(5_000, 250 * 2 ** this.#fullAttempts++));
        return;
      }
      for (const w of waiters) w.reject(err as Error);
    }
  }

  #commitLater(ms: number): void {
    if (this.#timer !== undefined) clearTimeout(this.#timer);
    this.#timer = setTimeout(() => {
      this.#timer = undefined;
      void this.#commit();
    }, ms);
    this.#timer.unref();
  }

  async flush(): Promise<void> {
    if (this.#timer !== undefined) {
      clearTimeout(this.#timer);
      this.#timer = undefined;
    }
    await this.#commit().catch(() => undefined);
  }

  async close(): Promise<void> {
    // A last try; on a still full disk the lines waiting are given up (their appends reject).
    this.#closing = true;
    await this.flush();
    this.#closed = true;
    await this.#chain;
  }

  async #days(): Promise<string[]> {
    const names = await readdir(this.#o.dir).catch(() => [] as string[]);
    return names
      .map((n) => FILE.exec(n)?.[1])
      .filter((d): d is string => d !== undefined)
      .sort();
  }

  async span(): Promise<{ first: string; last: string } | undefined> {
    const days = await this.#days();
    return days.length > 0 ? { first: days[0] as string, last: days[days.length - 1] as string } : undefined;
  }

  async query(q: RecordQuery): Promise<RecordPage> {
    const limit = q.limit ?? 1000;
    if (!Number.isInteger(limit) || limit < 1 || limit > MAX_PAGE)
      throw new RecordStoreError(`limit must be an integer from 1 to ${MAX_PAGE}`);
    const cursor = q.cursor !== undefined ? decodeCursor(q.cursor) : undefined;
    if (q.cursor !== undefined && cursor === undefined)
      throw new RecordStoreError('cursor is not one this server gave; start again without it');
    await this.flush();
    const from = Math.max(q.fromMs ?? Number.NEGATIVE_INFINITY, cursor?.t ?? Number.NEGATIVE_INFINITY);
    const to = q.toMs ?? Number.POSITIVE_INFINITY;
    const firstDay = Number.isFinite(from) ? dayName(from) : '';
    const lastDay = Number.isFinite(to) ? dayName(to - 1) : '9999-12-31';
    const out: DerivedRecord[] = [];
    let lastKey: Cursor | undefined;
    for (const day of await this.#days()) {
      if (day < firstDay || day > lastDay) continue;
      const found = await readDay(path.join(this.#o.dir, fileOf(day)), q, from, to);
      found.sort((a, b) => a.t - b.t || (a.k < b.k ? -1 : a.k > b.k ? 1 : 0));
      for (const f of found) {
        if (cursor !== undefined && (f.t < cursor.t || (f.t === cursor.t && f.k <= cursor.k))) continue;
        if (out.length === limit) return { records: out, next: encodeCursor(lastKey as Cursor) };
        out.push(f.r);
        lastKey = { t: f.t, k: f.k };
      }
    }
    return { records: out };
  }

  async maintain(): Promise<string[]> {
    const removed: string[] = [];
    const days = await this.#days();
    const today = Math.floor(this.#o.clock() / DAY_MS);
    const keep: string[] = [];
    for (const d of days) {
      const n = Math.floor(Date.parse(`${d}T00:00:00Z`) / DAY_MS);
      if (this.#o.retentionDays > 0 && n < today - this.#o.retentionDays) {
        await rm(path.join(this.#o.dir, fileOf(d)), { force: true });
        removed.push(fileOf(d));
      } else keep.push(d);
    }
    const maxBytes = (this.#o.maxTotalMb ?? 0) * 1024 * 1024;
    if (maxBytes > 0) {
      const sizes = await Promise.all(
        keep.map(async (d) => (await stat(path.join(this.#o.dir, fileOf(d)))).size),
      );
      let total = sizes.reduce((a, b) => a + b, 0);
      // Never the newest day: it is the one being written.
      for (let i = 0; i < keep.length - 1 && total > maxBytes; i++) {
        await rm(path.join(this.#o.dir, fileOf(keep[i] as string)), { force: true });
        removed.push(fileOf(keep[i] as string));
        total -= sizes[i] as number;
      }
    }
    return removed;
  }
}

function isDiskFull(err: unknown): boolean {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  return code === 'ENOSPC' || code === 'EDQUOT';
}

/** Appends lines to a file and fsyncs it; a line cut short by a crash is closed first. */
async function appendLines(file: string, lines: readonly string[]): Promise<void> {
  const fh = await open(file, 'a+');
  try {
    const size = (await fh.stat()).size;
    let head = '';
    if (size > 0) {
      const b = Buffer.alloc(1);
      await fh.read(b, 0, 1, size - 1);
      if (b[0] !== 0x0a) head = '\n';
    }
    await fh.write(`${head}${lines.join('\n')}\n`);
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/** The matching records of one day file, latest revision of each identity (the last line among equals). */
async function readDay(
  file: string,
  q: RecordQuery,
  fromMs: number,
  toMs: number,
): Promise<{ t: number; k: string; r: DerivedRecord }[]> {
  const byKey = new Map<string, { t: number; k: string; r: DerivedRecord; rev: number }>();
  const rl = createInterface({ input: createReadStream(file), crlfDelay: Infinity });
  for await (const text of rl) {
    if (text === '') continue;
    let raw: unknown;
    try {
      raw = JSON.parse(text);
    } catch {
      continue; // a line cut short by a crash
    }
    const p = derivedRecordSchema.safeParse(raw);
    if (!p.success) continue;
    const r = p.data;
    const t = Date.parse(r.t);
    if (!(t >= fromMs && t < toMs) || !matches(r, q)) continue;
    const k = recordKey(r);
    const rev = r.revision ?? 0;
    const prev = byKey.get(k);
    if (prev === undefined || rev >= prev.rev) byKey.set(k, { t, k, r, rev });
  }
  return [...byKey.values()];
}

export function recordsDir(dataDir: string): string {
  return path.join(dataDir, 'records');
}

export async function createRecordStore(o: RecordStoreOptions): Promise<RecordStore> {
  await mkdir(o.dir, { recursive: true });
  return new Store(o);
}
