// The outbox's state as a fold over its two journals: outbox.jsonl (written by the notifier only: queued items,
// deliveries, snapshots) and acks.jsonl (appended by anyone: the notifier, the CLI, the HTTP endpoint). Shared by
// the notifier and by `reefd alerts list|ack`, so both read the same truth.

import { join } from 'node:path';
import type { AlertRecord } from '../../libs/alerts/index.js';
import { Journal, readJournal } from './journal.js';

export const OUTBOX_FILE = 'outbox.jsonl';
export const ACKS_FILE = 'acks.jsonl';

/** The folder of the notifier's files inside the daemon's data folder. */
export function alertsStateDir(dataDir: string): string {
  return join(dataDir, 'alerts');
}

export interface OutboxItem {
  seq: number;
  kind: 'alert' | 'reminder';
  alert: AlertRecord;
  enqMs: number;
  /** Channel ids still to deliver to. */
  pending: string[];
}

export interface Episode {
  id: string;
  /** The raise record (absent when only the clear was seen, e.g. after a journal was lost). */
  raised?: AlertRecord;
  /** The latest record of the episode. */
  last: AlertRecord;
  cleared: boolean;
  ack?: EpisodeAck;
  /** Last time a notification (raise or reminder) was queued, ms. */
  lastNotifiedMs: number;
}

/** Who acknowledged an episode, when (wall clock, ms), and what they said. */
export interface EpisodeAck {
  by: string;
  atMs: number;
  comment?: string;
}

export interface OutboxState {
  seq: number;
  items: Map<number, OutboxItem>;
  episodes: Map<string, Episode>;
}

export type OutboxRecord =
  | { op: 'enq'; seq: number; kind: 'alert' | 'reminder'; at: number; alert: AlertRecord; ch: string[] }
  | { op: 'sent'; seqs: number[]; ch: string; at: number }
  | { op: 'snap'; v: 1; at: number; seq: number; items: OutboxItem[]; episodes: Episode[] };

export interface AckRecord {
  op: 'ack';
  id: string;
  by: string;
  at: number;
  /** What the person saw or did (optional, free text). */
  comment?: string;
}

export const emptyOutboxState = (): OutboxState => ({ seq: 0, items: new Map(), episodes: new Map() });

export function applyOutboxRecord(st: OutboxState, r: OutboxRecord): void {
  switch (r.op) {
    case 'snap':
      st.seq = r.seq;
      st.items = new Map(r.items.map((i) => [i.seq, i]));
      st.episodes = new Map(r.episodes.map((e) => [e.id, e]));
      return;
    case 'enq': {
      st.seq = Math.max(st.seq, r.seq);
      if (r.ch.length > 0)
        st.items.set(r.seq, { seq: r.seq, kind: r.kind, alert: r.alert, enqMs: r.at, pending: [...r.ch] });
      const ep = st.episodes.get(r.alert.id);
      if (r.kind === 'reminder') {
        if (ep) ep.lastNotifiedMs = r.at;
        return;
      }
      if (ep === undefined) {
        st.episodes.set(r.alert.id, {
          id: r.alert.id,
          ...(r.alert.state === 'raised' ? { raised: r.alert } : {}),
          last: r.alert,
          cleared: r.alert.state === 'cleared',
          lastNotifiedMs: r.at,
        });
      } else {
        ep.last = r.alert;
        if (r.alert.state === 'cleared') ep.cleared = true;
        else ep.raised ??= r.alert;
        ep.lastNotifiedMs = r.at;
      }
      return;
    }
    case 'sent':
      for (const s of r.seqs) {
        const it = st.items.get(s);
        if (it === undefined) continue;
        it.pending = it.pending.filter((c) => c !== r.ch);
        if (it.pending.length === 0) st.items.delete(s);
      }
      return;
  }
}

/**
 * Applies an acknowledgement; returns false when the id is unknown or the episode was already acknowledged
 * (the first ack of an episode stands).
 */
export function applyAck(st: OutboxState, r: AckRecord): boolean {
  const ep = st.episodes.get(r.id);
  if (ep === undefined || ep.ack !== undefined) return false;
  ep.ack = { by: r.by, atMs: r.at, ...(r.comment !== undefined ? { comment: r.comment } : {}) };
  return true;
}

function isOutboxRecord(x: unknown): x is OutboxRecord {
  const op = (x as { op?: unknown } | null)?.op;
  return op === 'enq' || op === 'sent' || op === 'snap';
}
function isAckRecord(x: unknown): x is AckRecord {
  const r = x as Partial<AckRecord> | null;
  return (
    r?.op === 'ack' &&
    typeof r.id === 'string' &&
    typeof r.by === 'string' &&
    typeof r.at === 'number' &&
    (r.comment === undefined || typeof r.comment === 'string')
  );
}

/** Reads both journals of `dir`; returns the state and the acks file end offset (for incremental reads). */
export async function loadOutboxState(dir: string): Promise<{ state: OutboxState; acksEnd: number }> {
  const st = emptyOutboxState();
  for (const r of (await readJournal(join(dir, OUTBOX_FILE))).records)
    if (isOutboxRecord(r)) applyOutboxRecord(st, r);
  const acks = await readJournal(join(dir, ACKS_FILE));
  for (const r of acks.records) if (isAckRecord(r)) applyAck(st, r);
  return { state: st, acksEnd: acks.end };
}

/** Reads acks appended after `offset` into `st`; returns the new offset and the acks that took effect. */
export async function readNewAcks(
  dir: string,
  st: OutboxState,
  offset: number,
): Promise<{ end: number; applied: AckRecord[] }> {
  const acks = await readJournal(join(dir, ACKS_FILE), offset);
  const applied: AckRecord[] = [];
  for (const r of acks.records) if (isAckRecord(r) && applyAck(st, r)) applied.push(r);
  return { end: acks.end, applied };
}

/** Appends one ack record, fsynced (the CLI's path; the notifier holds its own Journal on the same file). */
export async function appendAck(dir: string, rec: AckRecord): Promise<void> {
  const j = new Journal(join(dir, ACKS_FILE));
  await j.open();
  try {
    await j.append([rec]);
  } finally {
    await j.close();
  }
}
