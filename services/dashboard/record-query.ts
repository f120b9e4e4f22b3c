// `/api/records` answers from durable storage through one small interface, `RecordQuery`, so the store can be
// swapped without touching the HTTP side: today an NDJSON output file of the daemon (the `outputs.ndjson`
// file, read through a sparse time index), or the dashboard's own history when the site writes no such file.
// A paged answer carries an opaque cursor; memory is bounded by the page size whatever the range.
import { open, stat } from 'node:fs/promises';
import type { DerivedRecord, RecordType } from '../../libs/contract/index.js';
import type { RecordHistory } from './history.js';

export interface RecordFilter {
  types?: readonly RecordType[];
  station?: string;
  transect?: string;
  sensor?: string;
  /** Inclusive, ms. */
  fromMs: number;
  /** Exclusive, ms. */
  toMs: number;
}

export interface RecordPage {
  records: DerivedRecord[];
  /** Pass back to get the next page; undefined on the last page. */
  next?: string;
}

export interface RecordQuery {
  /** A few words for the answer's `source` field (e.g. "ndjson:records.ndjson"). */
  readonly source: string;
  query(filter: RecordFilter, page: { limit: number; cursor?: string }): Promise<RecordPage>;
  /** Time of the newest record the store holds, ms (for a default range), if it knows. */
  latestMs?(): Promise<number | undefined>;
}

export function matches(r: DerivedRecord, f: RecordFilter): boolean {
  if (f.types && !f.types.includes(r.type)) return false;
  if (f.station !== undefined && r.station !== f.station) return false;
  if (f.transect !== undefined && (r as { transect?: unknown }).transect !== f.transect) return false;
  if (f.sensor !== undefined && (r as { sensor?: unknown }).sensor !== f.sensor) return false;
  const t = Date.parse(r.t);
  return t >= f.fromMs && t < f.toMs;
}

/** The dashboard's own (downsampled, 48-h) history as a store: the fallback when nothing durable exists. */
export function historyRecordQuery(history: RecordHistory): RecordQuery {
  return {
    source: `dashboard history (${history.resolutionMs / 60_000}-min buckets, last ${history.windowMs / 3_600_000} h)`,
    async query(f, page) {
      const all = history.records({
        ...(f.types ? { types: f.types } : {}),
        ...(f.station !== undefined ? { station: f.station } : {}),
        ...(f.transect !== undefined ? { transect: f.transect } : {}),
        ...(f.sensor !== undefined ? { sensor: f.sensor } : {}),
        fromMs: f.fromMs,
        toMs: f.toMs,
      });
      const start = page.cursor !== undefined ? Number(page.cursor) : 0;
      const records = all.slice(start, start + page.limit);
      return start + page.limit < all.length ? { records, next: String(start + page.limit) } : { records };
    },
    async latestMs() {
      return history.latestMs || undefined;
    },
  };
}

// ------------------------------------------------------------------------------------ NDJSON output file

/** One stretch of the file: byte range (whole lines) and the range of record times in it. */
interface Chunk {
  start: number;
  end: number;
  minT: number;
  maxT: number;
}

const CHUNK_BYTES = 1 << 20;
const NL = 0x0a;
const T_FIELD = /"t":"([^"]{10,40})"/;

function encodeCursor(offset: number): string {
  return Buffer.from(`o${offset}`).toString('base64url');
}
function decodeCursor(c: string): number | undefined {
  const s = Buffer.from(c, 'base64url').toString('utf8');
  const n = /^o(\d{1,15})$/.exec(s);
  return n ? Number(n[1]) : undefined;
}

/**
 * Records of an append-only NDJSON file (the daemon's `outputs.ndjson`). A sparse index (per 1 MB of whole
 * lines: the least and greatest `t`) is built as the file grows, reading only the new bytes, so a range
 * query reads only the stretches that can hold it. Pages follow file order (the order records were derived,
 * time order within each series); the cursor is a byte offset.
 */
export function ndjsonRecordQuery(file: string, label = file): RecordQuery {
  const chunks: Chunk[] = [];
  let indexedTo = 0;
  let newest = Number.NEGATIVE_INFINITY;
  let indexing: Promise<void> | undefined;

  async function readRange(start: number, end: number): Promise<Buffer> {
    const fh = await open(file, 'r');
    try {
      const buf = Buffer.alloc(end - start);
      const { bytesRead } = await fh.read(buf, 0, buf.length, start);
      return buf.subarray(0, bytesRead);
    } finally {
      await fh.close();
    }
  }

  async function extend(): Promise<void> {
    let size: number;
    try {
      size = (await stat(file)).size;
    } catch {
      return; // no file yet: an empty store
    }
    if (size < indexedTo) {
      chunks.length = 0; // the file was replaced: start over
      indexedTo = 0;
    }
    while (indexedTo < size) {
      const buf = await readRange(indexedTo, Math.min(size, indexedTo + CHUNK_BYTES));
      const lastNl = buf.lastIndexOf(NL);
      if (lastNl < 0) break; // a line still being written
      const bytes = lastNl + 1;
      let minT = Number.POSITIVE_INFINITY;
      let maxT = Number.NEGATIVE_INFINITY;
      for (const line of buf.toString('utf8', 0, bytes).split('\n')) {
        const m = T_FIELD.exec(line);
        if (!m) continue;
        const t = Date.parse(m[1] as string);
        if (!Number.isFinite(t)) continue;
        if (t < minT) minT = t;
        if (t > maxT) maxT = t;
      }
      chunks.push({ start: indexedTo, end: indexedTo + bytes, minT, maxT });
      if (maxT > newest) newest = maxT;
      indexedTo += bytes;
    }
  }

  const index = async () => {
    indexing ??= extend().finally(() => (indexing = undefined));
    await indexing;
  };

  return {
    source: `ndjson:${label}`,
    async latestMs() {
      await index();
      return Number.isFinite(newest) ? newest : undefined;
    },
    async query(f, page) {
      await index();
      let offset = page.cursor !== undefined ? (decodeCursor(page.cursor) ?? 0) : 0;
      const records: DerivedRecord[] = [];
      for (const c of chunks) {
        if (c.end <= offset) continue;
        if (c.maxT < f.fromMs || c.minT >= f.toMs) {
          offset = c.end;
          continue;
        }
        const from = Math.max(offset, c.start);
        const buf = await readRange(from, c.end);
        let pos = 0;
        while (pos < buf.length) {
          let nl = buf.indexOf(NL, pos);
          if (nl < 0) nl = buf.length;
          const line = buf.toString('utf8', pos, nl);
          const lineEnd = from + nl + 1;
          pos = nl + 1;
          if (line.length === 0) continue;
          let r: DerivedRecord;
          try {
            r = JSON.parse(line) as DerivedRecord;
          } catch {
            continue;
          }
          if (!matches(r, f)) continue;
          records.push(r);
          if (records.length >= page.limit) {
            const more = lineEnd < indexedTo;
            return more ? { records, next: encodeCursor(lineEnd) } : { records };
          }
        }
        offset = c.end;
      }
      return { records };
    },
  };
}
