// An append-only text file: writes are queued in order, flush() waits for them and fsyncs.
//
// A full disk (ENOSPC, EDQUOT) loses nothing: a write cut short is cut back off the file (no half line
// stays), and the text waits in memory, in order, to be written again at the next write or flush; flush()
// throws a retriable REEFD_DISK_FULL while text waits. Any other write error stops the file for good
// (flush() throws it).
import type { FileHandle } from 'node:fs/promises';
import { ReefdError } from '../../libs/contract/index.js';

function isDiskFull(err: unknown): boolean {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  return code === 'ENOSPC' || code === 'EDQUOT';
}

export class TextFile {
  #fh: FileHandle;
  #chain: Promise<void> = Promise.resolve();
  #failed: Error | undefined;
  /** Text not yet on disk (the disk was full), oldest first. */
  #held: Buffer[] = [];
  #heldErr: Error | undefined;
  constructor(fh: FileHandle) {
    this.#fh = fh;
  }
  write(text: string): void {
    const buf = Buffer.from(text, 'utf8');
    this.#chain = this.#chain.then(async () => {
      if (this.#failed !== undefined) return;
      this.#held.push(buf);
      await this.#writeHeld();
    });
  }
  /** Writes everything held, in one piece; on a full disk cuts the file back and keeps holding it. */
  async #writeHeld(): Promise<void> {
    if (this.#held.length === 0) return;
    const buf = this.#held.length === 1 ? (this.#held[0] as Buffer) : Buffer.concat(this.#held);
    let size: number | undefined;
    try {
      size = (await this.#fh.stat()).size;
      let off = 0;
      while (off < buf.length) off += (await this.#fh.write(buf, off)).bytesWritten;
      this.#held = [];
      this.#heldErr = undefined;
    } catch (err) {
      if (!isDiskFull(err)) {
        this.#failed = err as Error;
        this.#held = [];
        return;
      }
      this.#held = [buf];
      this.#heldErr = err as Error;
      if (size !== undefined) await this.#fh.truncate(size).catch(() => undefined);
    }
  }
  async flush(): Promise<void> {
    const next = this.#chain.then(() => this.#writeHeld());
    this.#chain = next.catch(() => undefined);
    await next;
    if (this.#failed !== undefined) throw this.#failed;
    if (this.#held.length > 0)
      throw new ReefdError(
        'REEFD_DISK_FULL',
        'No space left for an output file; free space there (its records wait in memory).',
        { retriable: true, cause: this.#heldErr },
      );
    await this.#fh.sync();
  }
  async close(): Promise<void> {
    await this.flush().finally(() => this.#fh.close());
  }
}
