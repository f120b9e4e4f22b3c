// An append-only text file: writes are queued in order, flush() waits for them and fsyncs.
import type { FileHandle } from 'node:fs/promises';

export class TextFile {
  #fh: FileHandle;
  #chain: Promise<void> = Promise.resolve();
  #failed: Error | undefined;
  constructor(fh: FileHandle) {
    this.#fh = fh;
  }
  write(text: string): void {
    this.#chain = this.#chain.then(async () => {
      if (this.#failed !== undefined) return;
      try {
        const buf = Buffer.from(text, 'utf8');
        let off = 0;
        while (off < buf.length) off += (await this.#fh.write(buf, off)).bytesWritten;
      } catch (err) {
        this.#failed = err as Error;
      }
    });
  }
  async flush(): Promise<void> {
    await this.#chain;
    if (this.#failed !== undefined) throw this.#failed;
    await this.#fh.sync();
  }
  async close(): Promise<void> {
    await this.flush().finally(() => this.#fh.close());
  }
}
