// Notification messages built from queued alert records: one per group (same rule, state and kind, e.g. ten
// sensors going stale at once), a digest when many are queued, and "still active" reminders.

import type { AlertRecord } from '../../libs/alerts/index.js';
import { NOTIFY_ERRORS } from './errors.js';

export type MessageKind = 'alerts' | 'reminder' | 'digest';

export interface NotificationMessage {
  readonly kind: MessageKind;
  /** One line, for an e-mail subject or a chat title. */
  readonly subject: string;
  /** Plain-text body, one line per alert (a digest lists counts and the first lines). */
  readonly text: string;
  readonly alerts: readonly AlertRecord[];
  /** Outbox sequence numbers covered (internal; channels may ignore it). */
  readonly seqs: readonly number[];
}

export interface QueuedItem {
  readonly seq: number;
  readonly kind: 'alert' | 'reminder';
  readonly alert: AlertRecord;
}

const DIGEST_LINES = 20;

export function alertLine(a: AlertRecord, kind: 'alert' | 'reminder' = 'alert'): string {
  const what = a.metric ?? a.fault ?? a.rule;
  const where = placeOf(a);
  const state = kind === 'reminder' ? 'still raised' : a.state;
  const val = typeof a.value === 'number' ? ` value ${fmt(a.value)}` : '';
  const lim = typeof a.limit === 'number' ? ` limit ${fmt(a.limit)}` : '';
  return `[${a.severity}] ${a.rule} ${state} at ${where} (${what})${val}${lim} t=${a.t} id=${a.id}`;
}

/** station/sensor; a site-level record (no station) shows the site. */
const placeOf = (a: AlertRecord): string => {
  const st = (a.station as string | undefined) ?? a.site;
  return a.sensor === undefined ? st : `${st}/${a.sensor}`;
};

const fmt = (x: number): string => (Number.isInteger(x) ? String(x) : x.toPrecision(4));

/** Groups items by (kind, rule, state), in queue order of each group's first item. */
export function groupItems(items: readonly QueuedItem[]): QueuedItem[][] {
  const groups = new Map<string, QueuedItem[]>();
  for (const it of items) {
    const k = `${it.kind}|${it.alert.rule}|${it.alert.state}`;
    const g = groups.get(k);
    if (g) g.push(it);
    else groups.set(k, [it]);
  }
  return [...groups.values()];
}

export function groupMessage(site: string, items: readonly QueuedItem[]): NotificationMessage {
  const first = items[0];
  if (first === undefined)
    throw NOTIFY_ERRORS.error('REEFD_NOTIFY_EMPTY_GROUP', 'a message needs at least one alert');
  const a = first.alert;
  const kind: MessageKind = first.kind === 'reminder' ? 'reminder' : 'alerts';
  const state = first.kind === 'reminder' ? 'still raised' : a.state;
  const stations = [
    ...new Set(items.map((i) => (i.alert.station as string | undefined) ?? i.alert.site)),
  ].sort();
  const subject =
    items.length === 1
      ? `reefd ${site}: ${a.rule} ${state} at ${placeOf(a)}`
      : `reefd ${site}: ${a.rule} ${state} x${items.length} (${stations.join(', ')})`;
  return {
    kind,
    subject,
    text: items.map((i) => alertLine(i.alert, i.kind)).join('\n') + '\n',
    alerts: items.map((i) => i.alert),
    seqs: items.map((i) => i.seq),
  };
}

export function digestMessage(site: string, items: readonly QueuedItem[]): NotificationMessage {
  const counts = new Map<string, number>();
  for (const i of items) {
    const k = `${i.alert.rule} ${i.kind === 'reminder' ? 'still raised' : i.alert.state}`;
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  const summary = [...counts.entries()].map(([k, n]) => `${n} x ${k}`).join(', ');
  const lines = items.slice(0, DIGEST_LINES).map((i) => alertLine(i.alert, i.kind));
  if (items.length > DIGEST_LINES)
    lines.push(`... and ${items.length - DIGEST_LINES} more (reefd alerts list)`);
  return {
    kind: 'digest',
    subject: `reefd ${site}: digest of ${items.length} alert messages (${summary})`,
    text: `${summary}\n\n${lines.join('\n')}\n`,
    alerts: items.map((i) => i.alert),
    seqs: items.map((i) => i.seq),
  };
}
