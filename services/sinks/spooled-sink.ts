// The sending core shared by the database and Kafka sinks: records are encoded to one-line entries and
// queued in memory (bounded); a single pump sends batches, one in flight at a time, so the destination
// receives entries in the order they were written. A batch that fails with a retriable error goes to the
// disk spool, and while the spool is not empty every new entry goes behind it. The spool drains oldest
// first with backoff + jitter (retry.ts). Credentials refused or a database that does not exist (HTTP 401,
// 403, 404) are an outage the operator must fix, not a verdict on the data: the batch is spooled and
// retried, and `onAuth` tells the daemon (an operational alert) until a send succeeds again. Refusals of
// the data (other 4xx, or a destination's own "non-retriable" error) drop the batch with an error log:
// retrying data the destination refuses would block everything behind it forever. Programming errors are
// never retried.
//
// A full disk (the spool refuses with REEFD_DISK_FULL) loses nothing: the lines stay in memory, in order,
// and go to the destination directly while it answers; when it does not, they are held and the spool is
// tried again after a backoff (at most 5 s). Memory stays bounded by the intake: records come only from
// archived lines, and the archive on the same full disk refuses new messages (left unacknowledged).
//
// Entries carry the record's stream position (`encode` gets it); the destination's `send` skips what the
// destination already holds (kafka-sink.ts, influx-sink.ts) and says how many it skipped.
import { ReefdError, type DerivedRecord } from '../../libs/contract/index.js';
import type { RecordSink, SinkStats } from '../pipeline/types.js';
import { errFields, type Logger } from '../log/logger.js';
import { backoffDelayMs, retry, realSleep, type Sleep } from '../transport/backoff.js';
import { Spool } from './spool.js';

export type Encoded = { ok: true; entry: string } | { ok: false; reason: string };

export interface SpooledSinkOptions {
  name: string;
  /** One record (and its stream position, when known) to one entry without a newline, or the reason it has none. */
  encode: (r: DerivedRecord, pos: number | undefined) => Encoded;
  /**
   * Delivers a batch; throws a ReefdError('REEFD_SINK_UNAVAILABLE', retriable) for outages and
   * ('REEFD_SINK_AUTH', retriable) for refused credentials. May skip entries the destination already has.
   */
  send: (entries: readonly string[]) => Promise<void | { skipped: number }>;
  batchSize: number;
  flushMs: number;
  logger: Logger;
  /** Entries held in memory before they go to the spool (default 4 x batchSize). */
  maxMemoryLines?: number | undefined;
  backoff?: { baseMs: number; maxMs: number } | undefined;
  random?: (() => number) | undefined;
  sleep?: Sleep | undefined;
  /** Called once each time the spool passes 80 % of its bound (and again after it fell below 70 %). */
  onNearLimit?: ((s: { spoolBytes: number; maxBytes: number }) => void) | undefined;
  /** Called when the destination starts refusing the credentials (true) and when it takes a batch again (false). */
  onAuth?: ((failing: boolean, err?: Error) => void) | undefined;
  onClose?: (() => Promise<void>) | undefined;
  /** close() waits up to this long for the spool to drain (default 5 s; 0 = not at all). */
  closeDrainMs?: number | undefined;
}

/** The destination answered and refused the data: retrying cannot help. */
export function isRefusal(err: unknown): boolean {
  return err instanceof ReefdError && err.code === 'REEFD_SINK_UNAVAILABLE' && !err.retriable;
}

/** Credentials refused, or the database/bucket missing: spooled and retried, with an alert. */
export function isAuthFailure(err: unknown): boolean {
  return err instanceof ReefdError && err.code === 'REEFD_SINK_AUTH';
}

/** The spool's disk is full: the lines are held in memory and the spool is tried again later. */
function isDiskFull(err: unknown): boolean {
  return err instanceof ReefdError && err.code === 'REEFD_DISK_FULL';
}

/** Longest wait between two tries of a spool on a full disk. */
const HOLD_MAX_MS = 5_000;

function isProgrammingError(err: unknown): boolean {
  return err instanceof TypeError || err instanceof RangeError || err instanceof SyntaxError;
}

export class SpooledSink implements RecordSink {
  readonly name: string;
  readonly #o: SpooledSinkOptions;
  readonly #spool: Spool;
  readonly #memCap: number;
  #mem: string[] = [];
  #accepted = 0;
  /** Lines that left memory for good: delivered, spooled, refused or dropped. */
  #settled = 0;
  #flushWaiters: { target: number; resolve: () => void }[] = [];
  #wake: (() => void) | undefined;
  #timer: NodeJS.Timeout | undefined;
  #closing = false;
  #abort = new AbortController();
  #pump: Promise<void> | undefined;
  #nearSignalled = false;
  #authFailing = false;
  /** The spool's disk is full: lines stay in memory until a backoff wait ends (then the spool is tried again). */
  #spoolHeld = false;
  /** Backoff waits in a row while lines are held (0 once the spool or the destination takes lines again). */
  #holdAttempt = 0;
  #stats: SinkStats = { written: 0, failed: 0, pending: 0, skipped: 0 };

  constructor(o: SpooledSinkOptions, spool: Spool) {
    this.#o = o;
    this.name = o.name;
    this.#spool = spool;
    this.#memCap = o.maxMemoryLines ?? o.batchSize * 4;
  }

  start(): void {
    // A spool left near its bound by an earlier run is reported at once.
    this.#checkNear();
    this.#pump = this.#run().catch((err: unknown) => {
      this.#o.logger.error({ ...errFields(err), sink: this.name }, 'sink stopped on an unexpected error');
    });
  }

  write(records: readonly DerivedRecord[], firstPos?: number): void {
    if (this.#closing) {
      this.#stats.failed += records.length;
      this.#o.logger.error(
        { sink: this.name, n: records.length },
        'records written after close() were dropped',
      );
      return;
    }
    for (let i = 0; i < records.length; i++) {
      const r = records[i] as DerivedRecord;
      const enc = this.#o.encode(r, firstPos === undefined ? undefined : firstPos + i);
      if (!enc.ok) {
        this.#stats.failed++;
        this.#o.logger.warn(
          { sink: this.name, type: r.type, reason: enc.reason },
          'record cannot be encoded for this sink; dropped',
        );
        continue;
      }
      this.#mem.push(enc.entry);
      this.#accepted++;
    }
    if (this.#mem.length >= this.#o.batchSize || this.#mem.length > this.#memCap) this.#poke();
    else if (this.#timer === undefined && this.#mem.length > 0) {
      this.#timer = setTimeout(() => {
        this.#timer = undefined;
        this.#poke();
      }, this.#o.flushMs);
      this.#timer.unref();
    }
  }

  flush(): Promise<void> {
    if (this.#settled >= this.#accepted) return Promise.resolve();
    return new Promise((resolve) => {
      this.#flushWaiters.push({ target: this.#accepted, resolve });
      this.#poke();
    });
  }

  async close(): Promise<void> {
    if (this.#closing) return this.#pump;
    const deadline = Date.now() + (this.#o.closeDrainMs ?? 5_000);
    // Lines held in memory on a full disk with the destination down may never settle: the flush gets
    // the same bounded moment as the spool.
    await this.#boundedFlush(deadline);
    // Give a reachable destination a bounded moment to take what is spooled; the rest stays on disk
    // and is replayed at the next start.
    while (!this.#spool.isEmpty() && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
    this.#closing = true;
    this.#abort.abort(new Error('sink closing'));
    this.#poke();
    if (this.#timer !== undefined) clearTimeout(this.#timer);
    await this.#pump;
    await this.#spool.close();
    await this.#o.onClose?.();
  }

  async #boundedFlush(deadline: number): Promise<void> {
    if (!this.#spoolHeld && this.#holdAttempt === 0) return this.flush();
    let t: NodeJS.Timeout | undefined;
    await Promise.race([
      this.flush(),
      new Promise<void>((r) => (t = setTimeout(r, Math.max(0, deadline - Date.now())))),
    ]);
    clearTimeout(t);
  }

  stats(): SinkStats {
    const s: SinkStats = {
      ...this.#stats,
      pending: this.#mem.length + this.#spool.lines(),
      spoolBytes: this.#spool.bytes(),
    };
    return s;
  }

  nearLimit(): boolean {
    return this.#spool.nearLimit();
  }

  #poke(): void {
    const w = this.#wake;
    this.#wake = undefined;
    w?.();
  }

  #idle(ms?: number): Promise<void> {
    return new Promise((resolve) => {
      let t: NodeJS.Timeout | undefined;
      this.#wake = () => {
        if (t !== undefined) clearTimeout(t);
        resolve();
      };
      if (ms !== undefined) t = setTimeout(() => this.#poke(), ms);
    });
  }

  #settle(n: number): void {
    this.#settled += n;
    this.#flushWaiters = this.#flushWaiters.filter((w) => {
      if (this.#settled < w.target) return true;
      w.resolve();
      return false;
    });
  }

  #flushWanted(): boolean {
    return this.#flushWaiters.length > 0;
  }

  /** Lines in memory that should leave it now: a full batch, or any once flush_ms passed or a flush waits. */
  #due(): boolean {
    return (
      this.#mem.length >= this.#o.batchSize ||
      (this.#mem.length > 0 && (this.#flushWanted() || this.#closing || this.#timer === undefined))
    );
  }

  async #run(): Promise<void> {
    while (!(this.#closing && this.#mem.length === 0)) {
      if (!this.#spool.isEmpty()) {
        // Outage or leftovers: new lines queue behind the spool, and go into it as soon as they would have
        // been sent (a batch, flush_ms, a flush): during an outage the spool holds the data, not memory, so
        // its size (and the alert near its bound) says how much waits.
        if (this.#due()) await this.#spill();
        if (this.#closing) break;
        await this.#drainOne();
        continue;
      }
      if (this.#mem.length > this.#memCap && !this.#spoolHeld) {
        // The database is up but slower than the input: keep memory bounded, the spool takes the rest.
        await this.#spill();
        continue;
      }
      if (this.#due()) {
        await this.#sendFromMemory();
        continue;
      }
      await this.#idle();
    }
    this.#dropHeld();
  }

  /** One batch from memory: delivered, or spooled on a retriable failure, or dropped on a refusal. */
  async #sendFromMemory(): Promise<void> {
    const batch = this.#mem.splice(0, this.#o.batchSize);
    try {
      this.#delivered(batch.length, await this.#o.send(batch));
      this.#settle(batch.length);
      this.#holdAttempt = 0;
    } catch (err) {
      if (isRefusal(err) || isProgrammingError(err)) {
        this.#refused(err, batch.length);
        this.#settle(batch.length);
        return;
      }
      this.#stats.lastError = (err as Error).message;
      this.#authTrouble(err);
      this.#o.logger.warn(
        { sink: this.name, err: (err as Error).message, code: (err as { code?: string }).code },
        isDiskFull(err)
          ? 'delivery ledger cannot be saved (disk full); the batch waits and is sent again'
          : 'destination unreachable; spooling to disk',
      );
      this.#mem.unshift(...batch);
      await this.#spill();
      if (this.#spoolHeld) await this.#hold();
    }
  }

  /**
   * The destination failed and the spool's disk is full: waits (backoff, at most 5 s), then lets the spool
   * be tried again. At close the held lines cannot wait any longer: they are dropped, loudly.
   */
  async #hold(): Promise<void> {
    if (this.#closing) return this.#dropHeld();
    const backoff = this.#o.backoff ?? { baseMs: 250, maxMs: 30_000 };
    const ms = backoffDelayMs(this.#holdAttempt++, {
      baseMs: backoff.baseMs,
      maxMs: Math.min(backoff.maxMs, HOLD_MAX_MS),
      random: this.#o.random ?? Math.random,
    });
    await (this.#o.sleep ?? realSleep)(ms, this.#abort.signal).catch(() => undefined);
    this.#spoolHeld = false;
  }

  /**
   * Moves every line in memory, oldest first, to the spool. On a full disk the lines left stay in memory,
   * in order, and `#spoolHeld` says so until the next backoff wait ends.
   */
  async #spill(): Promise<void> {
    while (this.#mem.length > 0 && !this.#spoolHeld) {
      const part = this.#mem.slice(0, this.#o.batchSize);
      let ok: boolean;
      try {
        ok = await this.#spool.append(part);
      } catch (err) {
        ok = false;
        this.#stats.lastError = (err as Error).message;
        if (isDiskFull(err)) {
          this.#diskFull(err);
          break;
        }
      }
      if (this.#holdAttempt > 0 && ok) this.#holdAttempt = 0;
      this.#mem.splice(0, part.length);
      if (!ok) {
        this.#stats.failed += part.length;
        this.#o.logger.error(
          {
            sink: this.name,
            dropped: part.length,
            spoolBytes: this.#spool.bytes(),
            maxBytes: this.#spool.maxBytes(),
          },
          'REEFD_SPOOL_NEAR_LIMIT: spool full or disk error; newest records dropped (replay the raw archive to fill the gap)',
        );
      }
      this.#settle(part.length);
    }
    this.#checkNear();
  }

  /** At close: lines neither delivered nor spooled (full disk, destination down) are dropped, loudly. */
  #dropHeld(): void {
    const n = this.#mem.length;
    if (n === 0) return;
    this.#mem = [];
    this.#stats.failed += n;
    this.#o.logger.error(
      { sink: this.name, dropped: n, code: 'REEFD_DISK_FULL' },
      'closing with records neither delivered nor spooled (disk full, destination unreachable); replay the raw archive to fill the gap',
    );
    this.#settle(n);
  }

  #diskFull(err: unknown): void {
    if (this.#holdAttempt === 0)
      this.#o.logger.error(
        { sink: this.name, held: this.#mem.length, err: (err as Error).message, code: 'REEFD_DISK_FULL' },
        'spool disk full; records are held in memory and sent or spooled once possible',
      );
    this.#spoolHeld = true;
  }

  #checkNear(): void {
    const bytes = this.#spool.bytes();
    const max = this.#spool.maxBytes();
    if (!this.#nearSignalled && bytes >= 0.8 * max) {
      this.#nearSignalled = true;
      this.#o.logger.error({ sink: this.name, spoolBytes: bytes, maxBytes: max }, 'REEFD_SPOOL_NEAR_LIMIT');
      this.#o.onNearLimit?.({ spoolBytes: bytes, maxBytes: max });
    } else if (this.#nearSignalled && bytes < 0.7 * max) this.#nearSignalled = false;
  }

  /** Delivers the spool's oldest batch, retrying with backoff; while waiting, memory overflow is spilled. */
  async #drainOne(): Promise<void> {
    const batch = await this.#spool.peek(this.#o.batchSize);
    if (batch.length === 0) return;
    const backoff = this.#o.backoff ?? { baseMs: 250, maxMs: 30_000 };
    const sleep = this.#o.sleep ?? realSleep;
    try {
      const result = await retry(() => this.#o.send(batch), {
        ...backoff,
        random: this.#o.random ?? Math.random,
        maxAttempts: Infinity,
        signal: this.#abort.signal,
        retriable: (err) => !isRefusal(err) && !isProgrammingError(err),
        sleep: async (ms, signal) => {
          // Wake up early to move lines to the spool (memory bound, flush, close); then wait out the delay.
          let done = false;
          const slept = sleep(ms, signal).then(
            () => void (done = true),
            () => void (done = true),
          );
          while (!done && !signal?.aborted) {
            await Promise.race([slept, this.#idle()]);
            if (this.#due()) await this.#spill();
          }
          // The wait is over: a spool held on a full disk is tried again.
          this.#spoolHeld = false;
          if (signal?.aborted) throw signal.reason as Error;
        },
        onRetry: (err, attempt, delayMs) => {
          this.#stats.lastError = (err as Error).message;
          this.#authTrouble(err);
          if (attempt % 10 === 0)
            this.#o.logger.warn(
              { sink: this.name, attempt, delayMs, err: (err as Error).message },
              'destination still unreachable',
            );
        },
      });
      this.#delivered(batch.length, result);
      await this.#spool.commit(batch.length);
      this.#checkNear();
    } catch (err) {
      if (this.#abort.signal.aborted) return;
      this.#refused(err, batch.length);
      await this.#spool.commit(batch.length);
    }
  }

  #delivered(n: number, result: void | { skipped: number }): void {
    const skipped = result?.skipped ?? 0;
    this.#stats.written += n - skipped;
    (this.#stats.skipped as number) += skipped;
    if (this.#authFailing) {
      this.#authFailing = false;
      this.#o.logger.info({ sink: this.name }, 'destination takes the credentials again');
      this.#o.onAuth?.(false);
    }
  }

  #authTrouble(err: unknown): void {
    if (!isAuthFailure(err) || this.#authFailing) return;
    this.#authFailing = true;
    this.#o.logger.error(
      { sink: this.name, err: (err as Error).message, code: 'REEFD_SINK_AUTH' },
      'destination refuses the credentials or does not know the database; records are spooled and retried',
    );
    this.#o.onAuth?.(true, err as Error);
  }

  #refused(err: unknown, n: number): void {
    this.#stats.failed += n;
    this.#stats.lastError = (err as Error).message;
    this.#o.logger.error(
      { sink: this.name, n, err: (err as Error).message },
      'destination refused a batch; dropped',
    );
  }
}

/** Opens the spool folder (what an earlier run left is replayed first) and starts the pump. */
export async function createSpooledSink(
  o: SpooledSinkOptions & { spoolDir: string; spoolMaxBytes: number },
): Promise<SpooledSink> {
  const spool = await Spool.open({ dir: o.spoolDir, maxBytes: o.spoolMaxBytes });
  const s = new SpooledSink(o, spool);
  s.start();
  return s;
}
