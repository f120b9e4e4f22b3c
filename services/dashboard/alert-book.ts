// The alerts the dashboard lists: every episode (raise and clear share an id) seen in the record stream, seeded
// at start-up from the notifier's durable outbox and the processor's raised alerts, each with the unit and the
// words of its metric and its acknowledgement. Acknowledgements live in one place, the notifier's journal
// (services/notifiers): the page, `reefd alerts ack` and `POST /api/alerts/{id}/ack` all write there and all
// read from there, so every path shows one state.
import { alertId, type AlertRecord } from '../../libs/alerts/index.js';
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { AckEvent, AckResult, Episode } from '../notifiers/index.js';
import type { AlertView } from './api-schemas.js';
import { metricInfo } from './units.js';

/** What the dashboard needs of the acknowledgement store (the notifier). */
export interface AckStore {
  ack(id: string, by: string, comment?: string): Promise<AckResult>;
  onAck(fn: (ack: AckEvent) => void): () => void;
  status(): { readonly episodes: readonly Episode[] };
}

const MAX_EPISODES = 2000;

interface Entry {
  id: string;
  raised: AlertRecord | undefined;
  last: AlertRecord;
  clearedT: string | null;
  ack: { by: string; atMs: number; comment: string | null } | null;
}

/** The id of an alert record: the engine's own, else the one the notifier gives it (same inputs, same id). */
export function alertIdOf(a: AlertRecord): string {
  if (typeof a.id === 'string' && a.id !== '') return a.id;
  return alertId(
    `${a.site}|${a.rule}|${String(a.station)}|${a.sensor ?? ''}|${a.metric ?? ''}`,
    Date.parse(a.t) || 0,
  );
}

/**
 * Unit of an alert's value and limit: its metric's; seconds for a silence, volts for a battery, hours for the
 * battery trend warning (hours left to the cut-off).
 */
export function alertUnit(a: Pick<AlertRecord, 'metric' | 'fault' | 'rule'>): {
  unit: string;
  label: string;
} {
  if (a.rule === 'battery_trend') return { unit: 'h', label: 'hours to the battery cut-off' };
  if (a.metric !== undefined) return metricInfo(a.metric);
  if (a.fault === 'stale' || (a.fault as string | undefined) === 'silent')
    return { unit: 's', label: 'time without a message' };
  if (a.fault === 'battery') return { unit: 'V', label: 'supply voltage' };
  return { unit: '', label: '' };
}

export class AlertBook {
  readonly #entries = new Map<string, Entry>();
  readonly #windowMs: number;
  readonly #acks: AckStore | undefined;
  #latestMs = 0;

  constructor(o: { windowMs: number; acks?: AckStore | undefined }) {
    this.#windowMs = o.windowMs;
    this.#acks = o.acks;
    if (o.acks) {
      for (const ep of o.acks.status().episodes) {
        this.#observe(ep.raised ?? ep.last, false);
        if (ep.raised && ep.last !== ep.raised) this.#observe(ep.last, false);
        if (ep.ack) this.#setAck({ id: ep.id, by: ep.ack.by, atMs: ep.ack.atMs, ...ackComment(ep.ack) });
      }
    }
  }

  get canAck(): boolean {
    return this.#acks !== undefined;
  }

  /** Alert records from the stream; returns the views that changed. */
  observe(records: readonly DerivedRecord[]): AlertView[] {
    const changed = new Map<string, AlertView>();
    for (const r of records) {
      if (r.type !== 'alert') continue;
      const e = this.#observe(r as unknown as AlertRecord, true);
      if (e) changed.set(e.id, this.#view(e));
    }
    if (changed.size > 0) this.#bound();
    return [...changed.values()];
  }

  /** The processor's raised alerts at start-up (adds those the stream and the outbox did not show). */
  seed(active: readonly DerivedRecord[]): void {
    for (const r of active) {
      const a = r as unknown as AlertRecord;
      if (r.type === 'alert' && !this.#entries.has(alertIdOf(a))) this.#observe(a, false);
    }
  }

  #observe(a: AlertRecord, isNew: boolean): Entry | undefined {
    const id = alertIdOf(a);
    const tMs = Date.parse(a.t);
    if (Number.isFinite(tMs) && tMs > this.#latestMs) this.#latestMs = tMs;
    const prev = this.#entries.get(id);
    if (prev && a.state === 'raised' && prev.clearedT !== null) return undefined; // a late raise after its clear
    const e: Entry = prev ?? { id, raised: undefined, last: a, clearedT: null, ack: null };
    e.last = a;
    if (a.state === 'raised') e.raised ??= a;
    else e.clearedT = a.t;
    // Most recent activity last, so iteration order is the order of events.
    this.#entries.delete(id);
    this.#entries.set(id, e);
    return isNew || !prev ? e : undefined;
  }

  #setAck(ev: AckEvent): Entry | undefined {
    const e = this.#entries.get(ev.id);
    if (e === undefined || e.ack !== null) return undefined;
    e.ack = { by: ev.by, atMs: ev.atMs, comment: ev.comment ?? null };
    return e;
  }

  /** An acknowledgement that took effect anywhere (notifier listener); returns the new view. */
  applyAck(ev: AckEvent): AlertView | undefined {
    const e = this.#setAck(ev);
    return e ? this.#view(e) : undefined;
  }

  /** Acknowledges through the store; the view comes back with the ack (or the store's refusal). */
  async ack(
    id: string,
    by: string,
    comment: string | undefined,
  ): Promise<{ ok: true; alert: AlertView } | { ok: false; status: number; code: string; message: string }> {
    const e = this.#entries.get(id);
    if (e === undefined)
      return {
        ok: false,
        status: 404,
        code: 'REEFD_DASHBOARD_NO_ALERT',
        message: `no alert ${id} is known to the dashboard; list them at /api/alerts`,
      };
    if (this.#acks === undefined)
      return {
        ok: false,
        status: 503,
        code: 'REEFD_DASHBOARD_NO_ACK_STORE',
        message: "acknowledgements need the daemon's notifier, which this dashboard was started without",
      };
    if (e.clearedT !== null && e.ack === null)
      return {
        ok: false,
        status: 409,
        code: 'REEFD_NOTIFY_ALERT_CLEARED',
        message: `alert ${id} cleared at ${e.clearedT}; only a raised alert can be acknowledged`,
      };
    const r = await this.#acks.ack(id, by, comment);
    if (!r.ok) {
      const status = r.code === 'REEFD_NOTIFY_ALERT_CLEARED' ? 409 : 404;
      return { ok: false, status, code: r.code, message: r.message };
    }
    // The notifier's listener has applied it already; an ack from before (already) is applied here if not.
    const entry = this.#entries.get(id) as Entry;
    if (entry.ack === null)
      this.#setAck({
        id,
        by: r.by,
        atMs: Date.now(),
        ...(r.comment !== undefined ? { comment: r.comment } : {}),
      });
    return { ok: true, alert: this.#view(entry) };
  }

  #bound(): void {
    const cutoff = this.#latestMs - this.#windowMs;
    for (const [id, e] of this.#entries)
      if (e.clearedT !== null && Date.parse(e.clearedT) < cutoff) this.#entries.delete(id);
    // Oldest activity first: past the bound even raised episodes go (a storm of thousands of faults).
    for (const id of this.#entries.keys()) {
      if (this.#entries.size <= MAX_EPISODES) break;
      this.#entries.delete(id);
    }
  }

  #view(e: Entry): AlertView {
    const a = e.last;
    const r = e.raised ?? a;
    const u = alertUnit(a);
    const raisedT = typeof a.raised_t === 'string' ? a.raised_t : r.t;
    return {
      id: e.id,
      rule: a.rule,
      class: a.class,
      state: a.state,
      severity: typeof a.severity === 'string' ? a.severity : 'warning',
      station: a.station ?? null,
      sensor: a.sensor ?? null,
      metric: a.metric ?? null,
      fault: a.fault ?? null,
      // The latest transition's: why it was raised, or (cleared) the value and clear limit that ended it.
      value: a.value,
      limit: a.limit,
      unit: u.unit,
      label: u.label,
      raised_t: e.raised ? e.raised.t : raisedT,
      cleared_t: e.clearedT,
      t: a.t,
      ack: e.ack ? { by: e.ack.by, t: new Date(e.ack.atMs).toISOString(), comment: e.ack.comment } : null,
      can_ack: this.#acks !== undefined && a.state === 'raised' && e.ack === null,
    };
  }

  get(id: string): AlertView | undefined {
    const e = this.#entries.get(id);
    return e ? this.#view(e) : undefined;
  }

  /** Raised first (newest first), then cleared ones of the window (newest first). */
  list(): AlertView[] {
    const views = [...this.#entries.values()].reverse().map((e) => this.#view(e));
    return [...views.filter((v) => v.state === 'raised'), ...views.filter((v) => v.state === 'cleared')];
  }

  /** Raised alerts (the verdicts and the sensor view read these). */
  raised(): AlertView[] {
    return this.list().filter((v) => v.state === 'raised');
  }
}

function ackComment(a: { comment?: string }): { comment?: string } {
  return a.comment !== undefined ? { comment: a.comment } : {};
}
