// `/api/records` answers from durable storage through one small interface, `RecordQuery`, so the store can be
// swapped without touching the HTTP side: the daemon's record history (services/records, day files in the
// data folder), or the dashboard's own history when there is none. A paged answer carries an opaque cursor;
// memory is bounded by the page size whatever the range.
import type { DerivedRecord, RecordType } from '../../libs/contract/index.js';
import { MAX_PAGE, type RecordQuery as StoreQuery, type RecordStore } from '../records/index.js';
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

// ----------------------------------------------------------------------------- the daemon's record store

/**
 * The durable record history of services/records (day files under the data folder) as a RecordQuery. That
 * store filters by one type, station and transect; several types and a sensor are filtered here, so a page
 * may hold fewer records than asked while its cursor still leads on.
 */
export function recordStoreQuery(store: RecordStore, label: string): RecordQuery {
  return {
    source: label,
    async query(f, page) {
      const one = f.types?.length === 1 ? f.types[0] : undefined;
      const q: StoreQuery = {
        fromMs: f.fromMs,
        toMs: f.toMs,
        limit: Math.min(page.limit, MAX_PAGE),
        ...(one !== undefined ? { type: one } : {}),
        ...(f.station !== undefined ? { station: f.station } : {}),
        ...(f.transect !== undefined ? { transect: f.transect } : {}),
        ...(page.cursor !== undefined ? { cursor: page.cursor } : {}),
      };
      const r = await store.query(q);
      const records = r.records.filter((x) => matches(x, f));
      return r.next !== undefined ? { records, next: r.next } : { records };
    },
  };
}
