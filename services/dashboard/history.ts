// In-memory history of derived records for the dashboard: the last 48 h per series, each series bounded,
// plus the alert episodes (latest state per alert id) and their acknowledgements.
import type { DerivedRecord } from '../../libs/contract/index.js';

export const HISTORY_WINDOW_MS = 48 * 3_600_000;
/** 48 h at one record a minute; a series that reports faster keeps its newest 2880. */
export const MAX_PER_SERIES = 2880;
const MAX_ALERTS = 2000;

/** The series a record belongs to: type + station or transect (+ sensor, for stations with two of a kind). */
export function seriesKey(r: DerivedRecord): string {
  const where = r.type === 'flux' ? r.transect : (r.station ?? '');
  const sensor = 'sensor' in r && typeof r.sensor === 'string' && r.type !== 'alert' ? r.sensor : '';
  return `${r.type}|${where}|${sensor}`;
}

export interface AlertEntry {
  id: string;
  /** The latest record of the episode (raised, or cleared). */
  record: DerivedRecord & { type: 'alert' };
  raisedT: string;
  ack?: { by: string; atMs: number };
}

/** Alert id: the record's own `id` (the alert engine's), else rule, place and raise time (FNV-1a). */
export function alertIdOf(r: DerivedRecord & { type: 'alert' }): string {
  const own = (r as { id?: unknown }).id;
  if (typeof own === 'string' && own.length > 0) return own;
  const raised = (r as { raised_t?: unknown }).raised_t;
  const key = `${r.rule}|${r.station ?? ''}|${r.sensor ?? ''}|${typeof raised === 'string' ? raised : r.t}`;
  let h = 0x811c9dc5;
  for (let i = 0; i < key.length; i++) h = Math.imul(h ^ key.charCodeAt(i), 0x01000193) >>> 0;
  return h.toString(16).padStart(8, '0');
}

export class RecordHistory {
  readonly #series = new Map<string, DerivedRecord[]>();
  readonly #alerts = new Map<string, AlertEntry>();
  readonly #windowMs: number;
  readonly #maxPerSeries: number;
  #latestMs = 0;

  constructor(opts: { windowMs?: number; maxPerSeries?: number } = {}) {
    this.#windowMs = opts.windowMs ?? HISTORY_WINDOW_MS;
    this.#maxPerSeries = opts.maxPerSeries ?? MAX_PER_SERIES;
  }

  /** Adds records (any order within a batch; each series is kept sorted by time). */
  add(records: readonly DerivedRecord[]): void {
    for (const r of records) {
      const tMs = Date.parse(r.t);
      if (!Number.isFinite(tMs)) continue;
      if (tMs > this.#latestMs) this.#latestMs = tMs;
      if (r.type === 'alert') this.#addAlert(r);
      const key = seriesKey(r);
      let list = this.#series.get(key);
      if (list === undefined) {
        list = [];
        this.#series.set(key, list);
      }
      const last = list.at(-1);
      if (last === undefined || Date.parse(last.t) <= tMs) list.push(r);
      else {
        let i = list.length - 1;
        while (i > 0 && Date.parse((list[i - 1] as DerivedRecord).t) > tMs) i--;
        list.splice(i, 0, r);
      }
      if (list.length > this.#maxPerSeries) list.splice(0, list.length - this.#maxPerSeries);
    }
    this.#trim();
  }

  #addAlert(r: DerivedRecord & { type: 'alert' }): void {
    const id = alertIdOf(r);
    const prev = this.#alerts.get(id);
    const raised = (r as { raised_t?: unknown }).raised_t;
    const entry: AlertEntry = {
      id,
      record: r,
      raisedT: prev?.raisedT ?? (typeof raised === 'string' ? raised : r.t),
    };
    if (prev?.ack) entry.ack = prev.ack;
    this.#alerts.delete(id);
    this.#alerts.set(id, entry);
    while (this.#alerts.size > MAX_ALERTS) {
      const oldest = this.#alerts.keys().next().value as string;
      this.#alerts.delete(oldest);
    }
  }

  #trim(): void {
    const cutoff = this.#latestMs - this.#windowMs;
    for (const [key, list] of this.#series) {
      let n = 0;
      while (n < list.length && Date.parse((list[n] as DerivedRecord).t) < cutoff) n++;
      if (n > 0) list.splice(0, n);
      if (list.length === 0) this.#series.delete(key);
    }
  }

  /** Every record in the window, oldest first per series. */
  records(): DerivedRecord[] {
    return [...this.#series.values()].flat();
  }

  /** The newest record of each series. */
  latest(): DerivedRecord[] {
    return [...this.#series.values()].flatMap((l) => (l.length ? [l[l.length - 1] as DerivedRecord] : []));
  }

  alerts(): AlertEntry[] {
    return [...this.#alerts.values()].reverse();
  }

  alert(id: string): AlertEntry | undefined {
    return this.#alerts.get(id);
  }

  acknowledge(id: string, by: string, atMs: number): AlertEntry | undefined {
    const a = this.#alerts.get(id);
    if (a) a.ack = { by, atMs };
    return a;
  }

  /** Time of the newest record, ms (0 when empty). */
  get latestMs(): number {
    return this.#latestMs;
  }

  get size(): number {
    let n = 0;
    for (const l of this.#series.values()) n += l.length;
    return n;
  }
}
