// What an output has delivered, kept beside it in the data folder: per partition (Kafka) or for the whole
// destination (database, partition 0) the highest stream position the destination confirmed, and whether
// the last run closed cleanly. Written atomically after each confirmed batch, so after a crash it is at
// most one batch behind the destination: the batch that was in flight, which the output then checks
// against the destination itself before sending it again (kafka-sink.ts, influx-sink.ts).
//
// A save that fails (disk full) does not undo the delivery: the batch is at the destination, so the marks
// stay raised in memory and the batch counts as delivered. The next batch waits (ready() throws a
// retriable error, so the output holds it and retries) until the marks are on disk again: the file is
// never more than the one batch in flight behind.
import { ReefdError } from '../../libs/contract/index.js';
import { readJsonFile, writeFileAtomic } from './atomic-file.js';

interface LedgerFile {
  epoch: string;
  /** partition -> highest position confirmed. */
  hwm: Record<string, number>;
  /** The run that wrote it closed the output (nothing was in flight). */
  clean: boolean;
}

export class DeliveryLedger {
  readonly #file: string;
  readonly #epoch: string;
  readonly #hwm = new Map<number, number>();
  /** The previous run did not close cleanly: a batch may have landed without being recorded here. */
  readonly uncleanStart: boolean;
  #chain: Promise<void> = Promise.resolve();
  #written = '';
  /** Why the last save failed; undefined once the marks are on disk. */
  #unsaved: Error | undefined;

  private constructor(file: string, epoch: string, saved: LedgerFile | undefined) {
    this.#file = file;
    this.#epoch = epoch;
    const same = saved !== undefined && saved.epoch === epoch;
    if (same) for (const [p, pos] of Object.entries(saved.hwm)) this.#hwm.set(Number(p), pos);
    // A ledger of another epoch (or none) says nothing of this stream can be at the destination yet.
    this.uncleanStart = same && !saved.clean;
  }

  /** Reads the ledger and marks it in use (not clean) before anything is sent. */
  static async open(file: string, epoch: string): Promise<DeliveryLedger> {
    const raw = (await readJsonFile(file)) as Partial<LedgerFile> | undefined;
    const ok =
      raw !== undefined &&
      typeof raw.epoch === 'string' &&
      typeof raw.hwm === 'object' &&
      raw.hwm !== null &&
      typeof raw.clean === 'boolean';
    const l = new DeliveryLedger(file, epoch, ok ? (raw as LedgerFile) : undefined);
    await l.#save(false);
    return l;
  }

  get epoch(): string {
    return this.#epoch;
  }

  /** Highest position confirmed in `partition`; -1 when none. */
  hwm(partition = 0): number {
    return this.#hwm.get(partition) ?? -1;
  }

  /**
   * Raises the high-water marks (never lowers them) and records them durably. A failed save does not
   * throw (the destination holds the batch): ready() reports it before the next batch goes.
   */
  async delivered(marks: ReadonlyMap<number, number>): Promise<void> {
    let changed = false;
    for (const [p, pos] of marks) {
      if (pos > this.hwm(p)) {
        this.#hwm.set(p, pos);
        changed = true;
      }
    }
    if (changed || this.#unsaved !== undefined) await this.#trySave();
  }

  /**
   * Resolves when the marks are on disk, saving them again after a failed save; throws a retriable error
   * (REEFD_DISK_FULL on a full disk) while they cannot be written. Called before each batch is sent.
   */
  async ready(): Promise<void> {
    if (this.#unsaved === undefined) return;
    await this.#trySave();
    const err = this.#unsaved;
    if (err === undefined) return;
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOSPC' || code === 'EDQUOT')
      throw new ReefdError(
        'REEFD_DISK_FULL',
        `No space left for the delivery ledger ${this.#file}; free space there (records wait and nothing is lost).`,
        { retriable: true, detail: { path: this.#file }, cause: err },
      );
    throw err;
  }

  async #trySave(): Promise<void> {
    try {
      await this.#save(false);
      this.#unsaved = undefined;
    } catch (err) {
      this.#unsaved = err instanceof Error ? err : new Error(String(err));
    }
  }

  /** Records a clean close: nothing is in flight. */
  close(): Promise<void> {
    return this.#save(true);
  }

  #save(clean: boolean): Promise<void> {
    const next = this.#chain.then(async () => {
      const body: LedgerFile = { epoch: this.#epoch, hwm: Object.fromEntries(this.#hwm), clean };
      const text = JSON.stringify(body);
      if (text === this.#written) return;
      await writeFileAtomic(this.#file, text);
      this.#written = text;
    });
    this.#chain = next.catch(() => undefined);
    return next;
  }
}

/** A spool entry carries its stream position as a `<pos>\t` prefix (entries of other sinks have none). */
export function withPosition(pos: number | undefined, entry: string): string {
  return pos === undefined ? entry : `${pos}\t${entry}`;
}

export function splitPosition(entry: string): { pos: number | undefined; body: string } {
  const tab = entry.indexOf('\t');
  if (tab > 0 && tab < 17) {
    const head = entry.slice(0, tab);
    if (/^\d+$/.test(head)) return { pos: Number(head), body: entry.slice(tab + 1) };
  }
  return { pos: undefined, body: entry };
}
