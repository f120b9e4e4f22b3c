// The dashboard history on disk, so a restart shows the last 48 h at once: small NDJSON segments, one per hour
// of record time (`<dir>/<YYYYMMDDTHH>.ndjson`), holding each bucket's record once the bucket is final (see
// history.ts). Saving is an append of what became final since the last save (a few kB a minute for the demo),
// never a rewrite of the whole history; segments older than the window are deleted. A torn last line (a crash
// mid-append) is skipped on load. This is a cache for the first screen: the records themselves are in the
// outputs and the raw archive is the source of truth.
import { createReadStream } from 'node:fs';
import { appendFile, mkdir, readdir, rm } from 'node:fs/promises';
import path from 'node:path';
import { createInterface } from 'node:readline';
import type { DerivedRecord } from '../../libs/contract/index.js';

const HOUR_MS = 3_600_000;
const SEGMENT = /^(\d{8}T\d{2})\.ndjson$/;
/** Above this many lines waiting, a save starts without waiting for the timer. */
const MAX_PENDING_LINES = 20_000;

const segmentOf = (tMs: number): string => new Date(tMs).toISOString().slice(0, 13).replace(/[-:]/g, '');
const segmentStartMs = (name: string): number =>
  Date.UTC(+name.slice(0, 4), +name.slice(4, 6) - 1, +name.slice(6, 8), +name.slice(9, 11));

export interface HistoryLogStats {
  savedLines: number;
  savedBytes: number;
  saves: number;
  segments: number;
}

export class HistoryLog {
  readonly dir: string;
  readonly #windowMs: number;
  readonly #onError: (err: unknown) => void;
  #pending = new Map<string, string[]>();
  #pendingLines = 0;
  #chain: Promise<void> = Promise.resolve();
  #stats: HistoryLogStats = { savedLines: 0, savedBytes: 0, saves: 0, segments: 0 };

  constructor(o: { dir: string; windowMs: number; onError?: (err: unknown) => void }) {
    this.dir = o.dir;
    this.#windowMs = o.windowMs;
    this.#onError = o.onError ?? (() => undefined);
  }

  /** Reads every segment within the window of the newest one, oldest first, line by line. */
  async load(onBatch: (records: DerivedRecord[]) => void): Promise<number> {
    await mkdir(this.dir, { recursive: true });
    const names = (await readdir(this.dir)).filter((n) => SEGMENT.test(n)).sort();
    const newest = names.at(-1);
    if (newest === undefined) return 0;
    const cutoff = segmentStartMs(newest) + HOUR_MS - this.#windowMs - HOUR_MS;
    let n = 0;
    for (const name of names) {
      if (segmentStartMs(name) < cutoff) continue;
      const lines = createInterface({ input: createReadStream(path.join(this.dir, name), 'utf8') });
      let batch: DerivedRecord[] = [];
      for await (const line of lines) {
        if (line.length === 0) continue;
        try {
          batch.push(JSON.parse(line) as DerivedRecord);
        } catch {
          continue; // a torn line of a crash mid-append
        }
        if (batch.length >= 1000) {
          onBatch(batch);
          n += batch.length;
          batch = [];
        }
      }
      onBatch(batch);
      n += batch.length;
    }
    return n;
  }

  /** Queues records for the next save (one line each, into the segment of its hour). */
  append(records: readonly DerivedRecord[]): void {
    for (const r of records) {
      const tMs = Date.parse(r.t);
      if (!Number.isFinite(tMs)) continue;
      const seg = segmentOf(tMs);
      let list = this.#pending.get(seg);
      if (list === undefined) {
        list = [];
        this.#pending.set(seg, list);
      }
      list.push(JSON.stringify(r));
      this.#pendingLines++;
    }
    if (this.#pendingLines > MAX_PENDING_LINES) void this.save();
  }

  /** Appends what is queued (one write per segment touched) and drops segments older than the window. */
  save(): Promise<void> {
    const run = async () => {
      const pending = this.#pending;
      this.#pending = new Map();
      this.#pendingLines = 0;
      if (pending.size === 0) return;
      await mkdir(this.dir, { recursive: true });
      for (const [seg, lines] of pending) {
        const text = lines.join('\n') + '\n';
        await appendFile(path.join(this.dir, `${seg}.ndjson`), text, 'utf8');
        this.#stats.savedLines += lines.length;
        this.#stats.savedBytes += Buffer.byteLength(text);
      }
      this.#stats.saves++;
      await this.#prune([...pending.keys()].sort().at(-1) as string);
    };
    const p = this.#chain.then(run);
    this.#chain = p.catch((err: unknown) => this.#onError(err));
    return p;
  }

  async #prune(newest: string): Promise<void> {
    const names = (await readdir(this.dir)).filter((n) => SEGMENT.test(n)).sort();
    const last = names.at(-1) ?? `${newest}.ndjson`;
    const keepFrom = segmentStartMs(last.slice(0, 11)) - this.#windowMs - HOUR_MS;
    let kept = 0;
    for (const name of names) {
      if (segmentStartMs(name) < keepFrom) await rm(path.join(this.dir, name), { force: true });
      else kept++;
    }
    this.#stats.segments = kept;
  }

  get stats(): HistoryLogStats {
    return { ...this.#stats };
  }
}
