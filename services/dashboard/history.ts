// The dashboard's memory of recent records: per series (record type, station or transect, sensor) one record
// per time bucket (default 10 min) over a bounded window (default 48 h), in typed columns. A bucket keeps its
// worst-flagged record (flagged points stay visible on the plots), among equals the newest. The storage of a
// series is a ring of `window / resolution` slots allocated once: adding a record is O(1), memory does not
// grow with time or with the reporting rate, and nothing is ever trimmed. Full-resolution records for any
// range come from the durable store (/api/records); this is for the first screen and the live view.
//
// Values are kept as float32 (7 significant digits, more than any sensor resolves); the newest record of
// each series is also kept whole, for the numbers shown beside the plots.
import type { DerivedRecord, RecordType } from '../../libs/contract/index.js';

export const HISTORY_WINDOW_MS = 48 * 3_600_000;
export const HISTORY_RESOLUTION_MS = 10 * 60_000;

/** Column sentinels: a field that is null in the record, and a field the record does not have. */
const NULL = Number.NaN;
const ABSENT = Number.NEGATIVE_INFINITY; // JSON cannot carry an infinity, so no record value is this
const EMPTY = -1;

type Other = string | boolean | null | undefined;

/** How bad a record's quality is, for choosing the record a bucket keeps. */
function badness(r: DerivedRecord): number {
  const f = (r as { flag?: unknown }).flag;
  const rank = f === 4 ? 5 : f === 3 ? 4 : f === 9 ? 3 : 1;
  return rank + ((r as { valid?: unknown }).valid === false ? 0.5 : 0);
}
const badnessOfFlag = (flag: number, valid: Other): number =>
  (flag === 4 ? 5 : flag === 3 ? 4 : flag === 9 ? 3 : 1) + (valid === false ? 0.5 : 0);

/** The series a record belongs to: type + station or transect + sensor (two sensors of a kind never mix). */
export function seriesKey(r: DerivedRecord): string {
  const where = String('transect' in r && typeof r.transect === 'string' ? r.transect : (r.station ?? ''));
  const sensor =
    typeof (r as { sensor?: unknown }).sensor === 'string' ? (r as { sensor: string }).sensor : '';
  return `${r.type}|${where}|${sensor}`;
}

/** Shared copies of repeated strings (sensor ids, reasons, methods) so the columns hold references only. */
const interned = new Map<string, string>();
function intern(s: string): string {
  if (s.length > 200) return s;
  const have = interned.get(s);
  if (have !== undefined) return have;
  if (interned.size < 50_000) interned.set(s, s);
  return s;
}

const round7 = (v: number): number => Number(v.toPrecision(7));

const SKIP = new Set(['type', 'site', 't', 'station', 'transect', 'sensor', 'flag']);

class Series {
  readonly type: RecordType;
  readonly site: string;
  readonly subject: 'station' | 'transect';
  readonly where: string;
  readonly sensor: string | undefined;
  readonly cap: number;
  readonly bucket: Int32Array;
  readonly tMs: Float64Array;
  readonly flag: Uint8Array;
  readonly nums = new Map<string, Float32Array>();
  readonly others = new Map<string, Other[]>();
  lastBucket = Number.NEGATIVE_INFINITY;
  latest: DerivedRecord | undefined;
  latestMs = Number.NEGATIVE_INFINITY;

  constructor(r: DerivedRecord, cap: number) {
    this.type = r.type;
    this.site = r.site;
    this.subject = 'transect' in r && typeof r.transect === 'string' ? 'transect' : 'station';
    this.where = String(
      this.subject === 'transect'
        ? (r as { transect: string }).transect
        : ((r as { station?: unknown }).station ?? ''),
    );
    const s = (r as { sensor?: unknown }).sensor;
    this.sensor = typeof s === 'string' ? s : undefined;
    this.cap = cap;
    this.bucket = new Int32Array(cap).fill(EMPTY);
    this.tMs = new Float64Array(cap);
    this.flag = new Uint8Array(cap);
  }

  #num(name: string): Float32Array {
    let col = this.nums.get(name);
    if (col === undefined) {
      col = new Float32Array(this.cap).fill(ABSENT);
      this.nums.set(name, col);
    }
    return col;
  }

  #other(name: string): Other[] {
    let col = this.others.get(name);
    if (col === undefined) {
      col = new Array<Other>(this.cap).fill(undefined);
      this.others.set(name, col);
    }
    return col;
  }

  write(slot: number, b: number, tMs: number, r: DerivedRecord): void {
    this.bucket[slot] = b;
    this.tMs[slot] = tMs;
    const f = (r as { flag?: unknown }).flag;
    this.flag[slot] = typeof f === 'number' && f >= 1 && f <= 9 ? f : 0;
    for (const col of this.nums.values()) col[slot] = ABSENT;
    for (const col of this.others.values()) col[slot] = undefined;
    for (const [k, v] of Object.entries(r)) {
      if (SKIP.has(k)) continue;
      if (typeof v === 'number') this.#num(k)[slot] = Number.isFinite(v) ? v : NULL;
      else if (v === null) {
        // A null keeps the column kind the field already has (numbers mostly); a new field starts as text.
        if (this.nums.has(k) || !this.others.has(k)) this.#num(k)[slot] = NULL;
        else this.#other(k)[slot] = null;
      } else if (typeof v === 'string') this.#other(k)[slot] = intern(v);
      else if (typeof v === 'boolean') this.#other(k)[slot] = v;
      // objects and arrays are not plotted: left out of the history
    }
  }

  badnessAt(slot: number): number {
    return badnessOfFlag(this.flag[slot] as number, this.others.get('valid')?.[slot]);
  }

  read(slot: number): DerivedRecord {
    const rec: Record<string, unknown> = {
      type: this.type,
      site: this.site,
      t: new Date(this.tMs[slot] as number).toISOString(),
      [this.subject]: this.where,
    };
    if (this.sensor !== undefined) rec.sensor = this.sensor;
    for (const [k, col] of this.nums) {
      const v = col[slot] as number;
      if (v === ABSENT) continue;
      rec[k] = Number.isNaN(v) ? null : round7(v);
    }
    for (const [k, col] of this.others) {
      const v = col[slot];
      if (v !== undefined) rec[k] = v;
    }
    const f = this.flag[slot] as number;
    if (f > 0) rec.flag = f;
    return rec as DerivedRecord;
  }

  bytes(): number {
    return this.cap * (4 + 8 + 1 + 4 * this.nums.size + 8 * this.others.size) + 200;
  }
}

export interface HistoryFilter {
  types?: readonly RecordType[];
  station?: string;
  transect?: string;
  sensor?: string;
  fromMs?: number;
  toMs?: number;
}

export interface HistoryOptions {
  windowMs?: number;
  resolutionMs?: number;
  /**
   * Receives each bucket's record once the bucket is final (a later bucket of the series has begun), and a
   * closed bucket's record again when a late record replaces it: what the history log appends.
   */
  onFinal?: (records: DerivedRecord[]) => void;
}

export class RecordHistory {
  readonly windowMs: number;
  readonly resolutionMs: number;
  readonly #cap: number;
  readonly #series = new Map<string, Series>();
  readonly #onFinal: ((records: DerivedRecord[]) => void) | undefined;
  #latestMs = 0;

  constructor(opts: HistoryOptions = {}) {
    this.windowMs = opts.windowMs ?? HISTORY_WINDOW_MS;
    this.resolutionMs = opts.resolutionMs ?? HISTORY_RESOLUTION_MS;
    this.#cap = Math.ceil(this.windowMs / this.resolutionMs) + 1;
    this.#onFinal = opts.onFinal;
  }

  /**
   * Adds records (alerts are not series: the alert book keeps them). `quiet` loads a saved history without
   * reporting its buckets as final again.
   */
  add(records: readonly DerivedRecord[], quiet = false): void {
    const final: DerivedRecord[] = [];
    for (const r of records) {
      if (r.type === 'alert') continue;
      const tMs = Date.parse(r.t);
      if (!Number.isFinite(tMs)) continue;
      const key = seriesKey(r);
      let s = this.#series.get(key);
      if (s === undefined) {
        s = new Series(r, this.#cap);
        this.#series.set(key, s);
      }
      if (tMs > this.#latestMs) this.#latestMs = tMs;
      if (tMs >= s.latestMs) {
        s.latest = r;
        s.latestMs = tMs;
      }
      const b = Math.floor(tMs / this.resolutionMs);
      if (b <= s.lastBucket - this.#cap) continue; // older than the ring reaches
      const slot = ((b % this.#cap) + this.#cap) % this.#cap;
      if (b > s.lastBucket) {
        if (Number.isFinite(s.lastBucket)) {
          const prev = ((s.lastBucket % this.#cap) + this.#cap) % this.#cap;
          if (s.bucket[prev] === s.lastBucket) final.push(s.read(prev));
        }
        s.lastBucket = b;
        s.write(slot, b, tMs, r);
        continue;
      }
      if (s.bucket[slot] === b) {
        const have = s.badnessAt(slot);
        const next = badness(r);
        if (next < have || (next === have && tMs < (s.tMs[slot] as number))) continue;
      }
      s.write(slot, b, tMs, r);
      if (b < s.lastBucket) final.push(s.read(slot)); // a closed bucket changed: log its new record
    }
    if (!quiet && final.length > 0) this.#onFinal?.(final);
  }

  /** The records of the open (newest) bucket of every series: what a shutdown saves. */
  openBuckets(): DerivedRecord[] {
    const out: DerivedRecord[] = [];
    for (const s of this.#series.values()) {
      if (!Number.isFinite(s.lastBucket)) continue;
      const slot = ((s.lastBucket % this.#cap) + this.#cap) % this.#cap;
      if (s.bucket[slot] === s.lastBucket) out.push(s.read(slot));
    }
    return out;
  }

  #matches(s: Series, f: HistoryFilter): boolean {
    if (f.types && !f.types.includes(s.type)) return false;
    if (f.station !== undefined && !(s.subject === 'station' && s.where === f.station)) return false;
    if (f.transect !== undefined && !(s.subject === 'transect' && s.where === f.transect)) return false;
    if (f.sensor !== undefined && s.sensor !== f.sensor) return false;
    return true;
  }

  /** Records in the window (and the filter), oldest first within each series. */
  records(f: HistoryFilter = {}): DerivedRecord[] {
    const out: DerivedRecord[] = [];
    const from = Math.max(f.fromMs ?? -Infinity, this.#latestMs - this.windowMs);
    const to = f.toMs ?? Infinity;
    for (const s of this.#series.values()) {
      if (!this.#matches(s, f) || !Number.isFinite(s.lastBucket)) continue;
      const first = Math.max(s.lastBucket - this.#cap + 1, Math.floor(from / this.resolutionMs));
      for (let b = first; b <= s.lastBucket; b++) {
        const slot = ((b % this.#cap) + this.#cap) % this.#cap;
        if (s.bucket[slot] !== b) continue;
        const t = s.tMs[slot] as number;
        if (t >= from && t < to) out.push(s.read(slot));
      }
    }
    return out;
  }

  /** The newest record of each series (whole, not rounded). */
  latest(f: HistoryFilter = {}): DerivedRecord[] {
    const out: DerivedRecord[] = [];
    for (const s of this.#series.values()) if (s.latest && this.#matches(s, f)) out.push(s.latest);
    return out;
  }

  /** Time of the newest record, ms (0 when empty). */
  get latestMs(): number {
    return this.#latestMs;
  }

  get seriesCount(): number {
    return this.#series.size;
  }

  /** Records held (filled buckets). */
  get size(): number {
    let n = 0;
    for (const s of this.#series.values()) for (const b of s.bucket) if (b !== EMPTY) n++;
    return n;
  }

  /** Bytes of the typed columns (the bulk of the memory; the newest whole records come on top). */
  get columnBytes(): number {
    let n = 0;
    for (const s of this.#series.values()) n += s.bytes();
    return n;
  }
}
