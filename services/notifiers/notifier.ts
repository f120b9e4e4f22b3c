// The notifier: a durable outbox in front of the channels. enqueue() returns once the record is fsynced; a
// dispatch pass (tick) groups what is queued per channel, sends within the channel's rate limit, journals each
// delivery, and backs off with jitter on failure, so nothing is dropped while an uplink is down and a restart
// resends what was not confirmed (at-least-once). Long-lasting alerts get quiet reminders until acknowledged or
// cleared. Clock, timers and the jitter source are injected: tests drive tick() without sleeping.

import { join } from 'node:path';
import { alertId, type AlertRecord, type Severity } from '../../libs/alerts/index.js';
import type { Channel } from './channels/types.js';
import { Journal } from './journal.js';
import {
  digestMessage,
  groupItems,
  groupMessage,
  type NotificationMessage,
  type QueuedItem,
} from './messages.js';
import {
  ACKS_FILE,
  OUTBOX_FILE,
  applyAck,
  applyOutboxRecord,
  loadOutboxState,
  readNewAcks,
  type AckRecord,
  type Episode,
  type OutboxItem,
  type OutboxRecord,
  type OutboxState,
} from './outbox-state.js';
import { nextRetryDelayMs, type RetryPolicy } from './retry.js';
import { NOTIFY_ERRORS } from './errors.js';

export interface Clock {
  now(): number;
}
export interface Timers {
  set(fn: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

export interface NotifierOptions {
  /** Folder of outbox.jsonl and acks.jsonl (alertsStateDir(dataDir) for the daemon). */
  readonly dir: string;
  /** Site id for message subjects; default the `site` of the queued records. */
  readonly site?: string;
  readonly channels: readonly Channel[];
  readonly clock?: Clock;
  readonly timers?: Timers;
  /** Jitter source in [0, 1). */
  readonly random?: () => number;
  /** Queued alerts wait this long for companions before a channel sends (default 30 s). */
  readonly groupWindowMs?: number;
  /** Reminder interval for raised, unacknowledged alerts (default 4 h; 0 = never). */
  readonly renotifyMs?: number;
  /** At this many queued items a channel sends one digest instead (default 20). */
  readonly digestThreshold?: number;
  /** Default per-channel rate limit (default 6 messages per 60 min). */
  readonly rateLimit?: { readonly maxMessages: number; readonly perMs: number };
  readonly retry?: RetryPolicy;
  /** Upper bound on the sleep between passes, ms (picks up acks written by the CLI; default 30 s). */
  readonly maxSleepMs?: number;
  readonly onError?: (err: unknown, channelId: string) => void;
  /** Compact the journal after this many appended lines (default 2000). */
  readonly compactAfterLines?: number;
  /** Cleared, delivered episodes older than this are forgotten at compaction (default 7 days). */
  readonly keepClearedMs?: number;
}

export type AckResult =
  | { ok: true; id: string; by: string; already: boolean; comment?: string }
  | { ok: false; code: 'REEFD_NOTIFY_UNKNOWN_ALERT' | 'REEFD_NOTIFY_ALERT_CLEARED'; message: string };

/** An acknowledgement that took effect, from whichever path wrote it (this process, the CLI, the HTTP API). */
export interface AckEvent {
  id: string;
  by: string;
  atMs: number;
  comment?: string;
}

export interface NotifierStatus {
  readonly pending: Readonly<Record<string, number>>;
  readonly episodes: readonly Episode[];
}

export interface Notifier {
  start(): Promise<void>;
  stop(): Promise<void>;
  /** Queues an alert record durably (resolves after fsync) and schedules a pass. */
  enqueue(alert: AlertRecord): Promise<void>;
  /**
   * Acknowledges a raised episode by id, by a named person with an optional comment: stops its reminders.
   * A cleared episode cannot be acknowledged (REEFD_NOTIFY_ALERT_CLEARED): there is nothing left to act on.
   */
  ack(id: string, by: string, comment?: string): Promise<AckResult>;
  /** Reads acknowledgements other processes appended (the CLI) now, instead of at the next pass. */
  syncAcks(): Promise<void>;
  /** Called with every acknowledgement that takes effect, whoever wrote it; returns the unsubscribe. */
  onAck(fn: (ack: AckEvent) => void): () => void;
  /** Runs one dispatch pass now (the timer calls this; tests call it directly). */
  tick(): Promise<void>;
  status(): NotifierStatus;
}

const MAX_DIGEST_ITEMS = 500;

const SEVERITY_RANK: Record<Severity, number> = { info: 0, warning: 1, critical: 2 };

/**
 * Records from other producers (the daemon's own operational alerts) may lack our extension fields: an alert
 * without a severity counts as a warning, one without an id gets the engine's kind of id, so nothing is dropped
 * by a channel filter or merged into another episode.
 */
function normaliseAlert(a: AlertRecord): AlertRecord {
  const severity: Severity = a.severity in SEVERITY_RANK ? a.severity : 'warning';
  const id =
    typeof a.id === 'string' && a.id !== ''
      ? a.id
      : alertId(
          `${a.site}|${a.rule}|${String(a.station)}|${a.sensor ?? ''}|${a.metric ?? ''}`,
          Date.parse(a.t) || 0,
        );
  return a.severity === severity && a.id === id ? a : { ...a, severity, id };
}

interface ChannelState {
  attempts: number;
  retryAtMs: number;
  tokens: number;
  tokensAtMs: number;
}

// Unref'd: the notifier never keeps a process alive by itself (a daemon whose start failed must exit).
const realTimers: Timers = {
  set: (fn, ms) => setTimeout(fn, ms).unref(),
  clear: (h) => clearTimeout(h as ReturnType<typeof setTimeout>),
};

export function createNotifier(o: NotifierOptions): Notifier {
  const clock = o.clock ?? { now: () => Date.now() };
  const timers = o.timers ?? realTimers;
  const random = o.random ?? Math.random;
  const groupWindowMs = o.groupWindowMs ?? 30_000;
  const renotifyMs = o.renotifyMs ?? 4 * 3_600_000;
  const digestThreshold = o.digestThreshold ?? 20;
  const defaultRate = o.rateLimit ?? { maxMessages: 6, perMs: 3_600_000 };
  const retry = o.retry ?? { baseMs: 5_000, maxMs: 900_000 };
  const maxSleepMs = o.maxSleepMs ?? 30_000;
  const compactAfter = o.compactAfterLines ?? 2000;
  const keepClearedMs = o.keepClearedMs ?? 7 * 86_400_000;
  const ids = new Set<string>();
  for (const c of o.channels) {
    if (ids.has(c.id))
      throw NOTIFY_ERRORS.error('REEFD_NOTIFY_DUPLICATE_CHANNEL', `channel id "${c.id}" is used twice`);
    ids.add(c.id);
  }

  const outbox = new Journal(join(o.dir, OUTBOX_FILE));
  const acks = new Journal(join(o.dir, ACKS_FILE));
  let st: OutboxState = { seq: 0, items: new Map(), episodes: new Map() };
  let acksOffset = 0;
  let seqAlloc = 0; // allocated synchronously: concurrent enqueue() calls never share a number
  let started = false;
  let timer: unknown = null;
  let running: Promise<void> | null = null;
  const chs = new Map<string, ChannelState>();
  const ackListeners = new Set<(ack: AckEvent) => void>();
  const announce = (applied: readonly AckRecord[]): void => {
    for (const r of applied) {
      const ev: AckEvent = {
        id: r.id,
        by: r.by,
        atMs: r.at,
        ...(r.comment !== undefined ? { comment: r.comment } : {}),
      };
      for (const fn of ackListeners) fn(ev);
    }
  };
  /** Folds acks appended by other writers into the state and tells the listeners. */
  const readAcks = async (): Promise<void> => {
    const r = await readNewAcks(o.dir, st, acksOffset);
    acksOffset = r.end;
    announce(r.applied);
  };
  const rateOf = (c: Channel) => c.rateLimit ?? defaultRate;
  for (const c of o.channels)
    chs.set(c.id, { attempts: 0, retryAtMs: 0, tokens: rateOf(c).maxMessages, tokensAtMs: clock.now() });

  const record = async (recs: OutboxRecord[]): Promise<void> => {
    await outbox.append(recs);
    for (const r of recs) applyOutboxRecord(st, r);
  };

  const channelsFor = (a: AlertRecord): string[] =>
    o.channels
      .filter((c) => SEVERITY_RANK[a.severity] >= SEVERITY_RANK[c.minSeverity ?? 'info'])
      .map((c) => c.id);

  function queuedFor(chId: string): OutboxItem[] {
    const out: OutboxItem[] = [];
    for (const it of st.items.values()) if (it.pending.includes(chId)) out.push(it);
    return out.sort((a, b) => a.seq - b.seq);
  }

  function refill(c: Channel, cs: ChannelState, now: number): void {
    const r = rateOf(c);
    cs.tokens = Math.min(r.maxMessages, cs.tokens + ((now - cs.tokensAtMs) * r.maxMessages) / r.perMs);
    cs.tokensAtMs = now;
  }

  async function dispatch(c: Channel): Promise<void> {
    const cs = chs.get(c.id) as ChannelState;
    const now = clock.now();
    if (now < cs.retryAtMs) return;
    let queued = queuedFor(c.id);
    // Reminders of episodes acknowledged or cleared since they were queued are void.
    const stale = queued.filter((i) => i.kind === 'reminder' && !reminderWanted(st.episodes.get(i.alert.id)));
    if (stale.length > 0) {
      await record([{ op: 'sent', seqs: stale.map((i) => i.seq), ch: c.id, at: now }]);
      queued = queuedFor(c.id);
    }
    const first = queued[0];
    if (first === undefined) return;
    if (now - first.enqMs < groupWindowMs && queued.length < digestThreshold) return;
    refill(c, cs, now);
    const items: QueuedItem[] = queued.map((i) => ({ seq: i.seq, kind: i.kind, alert: i.alert }));
    // A digest covers at most MAX_DIGEST_ITEMS, so a long outage drains in bounded messages.
    const messages: NotificationMessage[] =
      items.length >= digestThreshold
        ? [digestMessage(o.site ?? first.alert.site, items.slice(0, MAX_DIGEST_ITEMS))]
        : groupItems(items).map((g) => groupMessage(o.site ?? first.alert.site, g));
    for (const m of messages) {
      // Rate limited: stays queued (a later pass may fold it into a digest). Critical alerts are never held back
      // by the limit: a hypoxia warning must not wait behind a burst of sensor faults.
      const critical = m.alerts.some((a) => a.severity === 'critical');
      if (cs.tokens < 1 && !critical) continue;
      try {
        await c.send(m);
      } catch (err) {
        cs.attempts += 1;
        cs.retryAtMs = clock.now() + nextRetryDelayMs(err, cs.attempts, retry, random);
        o.onError?.(err, c.id);
        return;
      }
      cs.tokens = Math.max(-rateOf(c).maxMessages, cs.tokens - 1);
      cs.attempts = 0;
      cs.retryAtMs = 0;
      await record([{ op: 'sent', seqs: [...m.seqs], ch: c.id, at: clock.now() }]);
    }
  }

  const reminderWanted = (ep: Episode | undefined): ep is Episode & { raised: AlertRecord } =>
    ep !== undefined && !ep.cleared && ep.ack === undefined && ep.raised !== undefined;

  async function queueReminders(now: number): Promise<void> {
    if (renotifyMs <= 0) return;
    const recs: OutboxRecord[] = [];
    for (const ep of st.episodes.values()) {
      if (!reminderWanted(ep) || now - ep.lastNotifiedMs < renotifyMs) continue;
      recs.push({
        op: 'enq',
        seq: ++seqAlloc,
        kind: 'reminder',
        at: now,
        alert: ep.raised,
        ch: channelsFor(ep.raised),
      });
    }
    if (recs.length > 0) await record(recs);
  }

  async function maybeCompact(now: number): Promise<void> {
    if (outbox.lines < compactAfter) return;
    const episodes = [...st.episodes.values()].filter(
      (e) =>
        !(
          e.cleared &&
          now - e.lastNotifiedMs > keepClearedMs &&
          ![...st.items.values()].some((i) => i.alert.id === e.id)
        ),
    );
    st.episodes = new Map(episodes.map((e) => [e.id, e]));
    await outbox.compact([
      { op: 'snap', v: 1, at: now, seq: st.seq, items: [...st.items.values()], episodes },
    ]);
  }

  function nextWakeMs(now: number): number {
    let wake = now + maxSleepMs;
    for (const c of o.channels) {
      const q = queuedFor(c.id);
      const first = q[0];
      if (first === undefined) continue;
      const cs = chs.get(c.id) as ChannelState;
      const r = rateOf(c);
      const tokenAt = cs.tokens >= 1 ? 0 : cs.tokensAtMs + ((1 - cs.tokens) * r.perMs) / r.maxMessages;
      const groupAt = q.length >= digestThreshold ? 0 : first.enqMs + groupWindowMs;
      wake = Math.min(wake, Math.max(cs.retryAtMs, tokenAt, groupAt));
    }
    if (renotifyMs > 0) {
      for (const ep of st.episodes.values())
        if (reminderWanted(ep)) wake = Math.min(wake, ep.lastNotifiedMs + renotifyMs);
    }
    return wake;
  }

  function schedule(): void {
    if (!started) return;
    if (timer !== null) timers.clear(timer);
    const now = clock.now();
    timer = timers.set(
      () => {
        timer = null;
        void api.tick().catch((err: unknown) => o.onError?.(err, '*'));
      },
      Math.max(0, nextWakeMs(now) - now),
    );
  }

  const api: Notifier = {
    async start() {
      if (started) return;
      const loaded = await loadOutboxState(o.dir);
      st = loaded.state;
      acksOffset = loaded.acksEnd;
      seqAlloc = st.seq;
      // Items for channels no longer configured cannot be delivered: forget those channels.
      for (const it of st.items.values()) {
        it.pending = it.pending.filter((c) => ids.has(c));
        if (it.pending.length === 0) st.items.delete(it.seq);
      }
      await outbox.open();
      await acks.open();
      started = true;
      schedule();
    },
    async stop() {
      started = false;
      if (timer !== null) timers.clear(timer);
      timer = null;
      await running?.catch(() => undefined);
      await outbox.close();
      await acks.close();
    },
    async enqueue(input) {
      if (!started) throw NOTIFY_ERRORS.error('REEFD_NOTIFY_NOT_STARTED', 'call start() before enqueue()');
      const alert = normaliseAlert(input);
      await record([
        { op: 'enq', seq: ++seqAlloc, kind: 'alert', at: clock.now(), alert, ch: channelsFor(alert) },
      ]);
      if (running === null) schedule();
    },
    async ack(id, by, comment) {
      if (!started) throw NOTIFY_ERRORS.error('REEFD_NOTIFY_NOT_STARTED', 'call start() before ack()');
      await readAcks();
      const ep = st.episodes.get(id);
      if (ep === undefined) {
        return {
          ok: false,
          code: 'REEFD_NOTIFY_UNKNOWN_ALERT',
          message: `no alert with id ${id}; list them with "reefd alerts list"`,
        };
      }
      if (ep.ack !== undefined) {
        const c = ep.ack.comment;
        return { ok: true, id, by: ep.ack.by, already: true, ...(c !== undefined ? { comment: c } : {}) };
      }
      if (ep.cleared) {
        return {
          ok: false,
          code: 'REEFD_NOTIFY_ALERT_CLEARED',
          message: `alert ${id} has cleared; only a raised alert can be acknowledged`,
        };
      }
      const text = comment?.trim();
      const rec: AckRecord = { op: 'ack', id, by, at: clock.now(), ...(text ? { comment: text } : {}) };
      await acks.append([rec]);
      if (applyAck(st, rec)) announce([rec]);
      return { ok: true, id, by, already: false, ...(text ? { comment: text } : {}) };
    },
    async syncAcks() {
      if (started) await readAcks();
    },
    onAck(fn) {
      ackListeners.add(fn);
      return () => void ackListeners.delete(fn);
    },
    tick() {
      if (running !== null) return running;
      const pass = async (): Promise<void> => {
        await readAcks();
        await queueReminders(clock.now());
        await Promise.all(o.channels.map((c) => dispatch(c)));
        await maybeCompact(clock.now());
      };
      running = pass().finally(() => {
        running = null;
        schedule();
      });
      return running;
    },
    status() {
      const pending: Record<string, number> = {};
      for (const c of o.channels) pending[c.id] = queuedFor(c.id).length;
      return { pending, episodes: [...st.episodes.values()] };
    },
  };
  return api;
}
