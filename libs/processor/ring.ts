// The recent raw messages, in the order the processor accepted them, and snapshots of the processor's state
// taken among them: what a re-derivation of late lab results rewinds to and replays (revise.ts). Only the
// re-derivation's scope (scope.ts) is kept whole; of other messages, their time. Held in memory only, not in
// the checkpoint (a day of a site's messages is megabytes), so after a restart it covers the time since the
// restart. Bounded: snapshots over the reach (one per `everyMs` of event time), the messages accepted since
// the oldest snapshot kept, and at most `maxMessages` of them.
import type { SensorMessage } from '../contract/index.js';
import type { ProcessorState } from './state.js';

export interface RingEntry {
  /** Order of acceptance. */
  seq: number;
  /** The message, or undefined for a message outside the re-derivation's scope (only its times are kept). */
  message: SensorMessage | undefined;
  /** The message's time (`t`), ms. */
  tMs: number;
  rxMs: number;
  /** When the message was complete (the processor's clock moves to it), ms. */
  eventMs: number;
}

export interface Snapshot {
  /** The state after the message of this sequence number (and before the next). */
  seq: number;
  /** The state's newest event time then, ms: the snapshot precedes every record of a later time. */
  maxEventMs: number;
  state: ProcessorState;
}

export interface RingOptions {
  /** A snapshot whenever the newest event time enters a new period of this length, ms. */
  everyMs: number;
  /** Snapshots are kept while they can serve a sample this far behind the newest event time, ms. */
  reachMs: number;
  /** At most this many messages (a bound whatever the rate); older snapshots go with them. */
  maxMessages: number;
}

export class MessageRing {
  readonly #o: RingOptions;
  #entries: RingEntry[] = [];
  #head = 0;
  #snapshots: Snapshot[] = [];
  #seq = 0;
  #lastPeriod = Number.NEGATIVE_INFINITY;

  constructor(o: RingOptions) {
    this.#o = o;
  }

  get size(): number {
    return this.#entries.length - this.#head;
  }

  get snapshots(): number {
    return this.#snapshots.length;
  }

  /** Notes an accepted message (undefined: one outside the scope, of which only its times matter). */
  add(message: SensorMessage | undefined, tMs: number, rxMs: number, eventMs: number): void {
    // Without a snapshot before them, messages could never be replayed: keep none until the first.
    if (this.#snapshots.length === 0) {
      this.#seq++;
      return;
    }
    this.#entries.push({ seq: this.#seq++, message, tMs, rxMs, eventMs });
    if (this.size > this.#o.maxMessages) this.#dropOldestSnapshot();
  }

  /** True when a snapshot is due at this newest event time (a new period began). */
  due(maxEventMs: number): boolean {
    return Math.floor(maxEventMs / this.#o.everyMs) > this.#lastPeriod;
  }

  /** Keeps a snapshot of the state after the last message added, and drops those past the reach. */
  snapshot(maxEventMs: number, state: ProcessorState): void {
    this.#lastPeriod = Math.floor(maxEventMs / this.#o.everyMs);
    this.#snapshots.push({ seq: this.#seq - 1, maxEventMs, state });
    // The oldest kept serves samples back to the reach: drop those before a snapshot that already does.
    const cut = maxEventMs - this.#o.reachMs;
    while (this.#snapshots.length > 1 && (this.#snapshots[1] as Snapshot).maxEventMs <= cut)
      this.#dropOldestSnapshot();
  }

  /** The latest snapshot taken at or before tMs (its newest event time), if one is kept. */
  snapshotBefore(tMs: number): Snapshot | undefined {
    let found: Snapshot | undefined;
    for (const s of this.#snapshots) {
      if (s.maxEventMs > tMs) break;
      found = s;
    }
    return found;
  }

  /** The messages accepted after a snapshot, in acceptance order. */
  after(s: Snapshot): RingEntry[] {
    const out: RingEntry[] = [];
    for (let i = this.#head; i < this.#entries.length; i++) {
      const e = this.#entries[i] as RingEntry;
      if (e.seq > s.seq) out.push(e);
    }
    return out;
  }

  #dropOldestSnapshot(): void {
    this.#snapshots.shift();
    const first = this.#snapshots[0];
    // Messages before the oldest snapshot kept can no longer be replayed.
    const keepAfter = first === undefined ? this.#seq : first.seq;
    while (this.size > 0 && (this.#entries[this.#head] as RingEntry).seq <= keepAfter) {
      this.#entries[this.#head++] = undefined as unknown as RingEntry;
    }
    if (this.#head > 1024 && this.#head * 2 > this.#entries.length) {
      this.#entries = this.#entries.slice(this.#head);
      this.#head = 0;
    }
  }
}
