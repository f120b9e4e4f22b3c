// The query string of `GET /api/records` (docs/contract-v1.md, HTTP) checked into a RecordQuery, for the
// HTTP server: `type`, `station`, `transect`, `from` and `to` (ISO 8601 with a zone), `limit`, `cursor`.
import { ID_PATTERN, RECORD_TYPES, type RecordType } from '../../libs/contract/index.js';
import { MAX_PAGE, type RecordQuery } from './store.js';

const ISO_ZONED = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/;

export type ParsedQuery = { ok: true; query: RecordQuery } | { ok: false; message: string };

export function parseRecordQuery(params: URLSearchParams): ParsedQuery {
  const q: RecordQuery = {};
  const known = new Set(['type', 'station', 'transect', 'from', 'to', 'limit', 'cursor']);
  for (const k of params.keys())
    if (!known.has(k)) return { ok: false, message: `unknown parameter "${k}" (${[...known].join(', ')})` };
  const type = params.get('type');
  if (type !== null) {
    if (!(RECORD_TYPES as string[]).includes(type))
      return { ok: false, message: `type must be one of ${RECORD_TYPES.join(', ')}` };
    q.type = type as RecordType;
  }
  for (const k of ['station', 'transect'] as const) {
    const v = params.get(k);
    if (v === null) continue;
    if (!ID_PATTERN.test(v)) return { ok: false, message: `${k} "${v}" is not an id` };
    q[k] = v;
  }
  for (const k of ['from', 'to'] as const) {
    const v = params.get(k);
    if (v === null) continue;
    const ms = Date.parse(v);
    if (!ISO_ZONED.test(v) || !Number.isFinite(ms))
      return { ok: false, message: `${k} must be an ISO 8601 time with a zone, e.g. 2026-07-14T00:00:00Z` };
    if (k === 'from') q.fromMs = ms;
    else q.toMs = ms;
  }
  if (q.fromMs !== undefined && q.toMs !== undefined && q.fromMs >= q.toMs)
    return { ok: false, message: 'from must be before to' };
  const limit = params.get('limit');
  if (limit !== null) {
    const n = Number(limit);
    if (!Number.isInteger(n) || n < 1 || n > MAX_PAGE)
      return { ok: false, message: `limit must be an integer from 1 to ${MAX_PAGE}` };
    q.limit = n;
  }
  const cursor = params.get('cursor');
  if (cursor !== null) q.cursor = cursor;
  return { ok: true, query: q };
}
