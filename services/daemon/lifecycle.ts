// What the daemon has started, in order, and how to stop each part: the stop path (and a start that fails
// half-way) closes them in reverse, so the parts started last (sources) stop first and the ones everything
// else uses (clients) stop last. Each close runs even when an earlier one failed; a close that hangs is
// cut off at the deadline so the process can still exit.
import type { Logger } from '../log/logger.js';
import { errFields } from '../log/logger.js';

interface Part {
  name: string;
  close: () => Promise<unknown>;
}

export class Lifecycle {
  readonly #parts: Part[] = [];
  readonly #logger: Logger;
  #closing: Promise<void> | undefined;

  constructor(logger: Logger) {
    this.#logger = logger;
  }

  /** Registers a started part; returns the value for chaining (`const x = life.add('x', await make(), ...)`). */
  add<T>(name: string, value: T, close: (value: T) => Promise<unknown> | unknown): T {
    this.#parts.push({ name, close: async () => close(value) });
    return value;
  }

  /** Names of the parts started so far, in start order (for tests and the log). */
  names(): string[] {
    return this.#parts.map((p) => p.name);
  }

  /** Closes every part in reverse order, each bounded by what is left of `deadlineMs`. */
  closeAll(deadlineMs: number): Promise<void> {
    this.#closing ??= (async () => {
      const end = Date.now() + deadlineMs;
      for (const part of this.#parts.splice(0).reverse()) {
        const left = Math.max(100, end - Date.now());
        let timer: NodeJS.Timeout | undefined;
        const cut = new Promise<'timeout'>((r) => {
          timer = setTimeout(() => r('timeout'), left);
          timer.unref();
        });
        try {
          const r = await Promise.race([part.close().then(() => 'ok' as const), cut]);
          if (r === 'timeout') this.#logger.warn({ part: part.name }, 'stop: part did not close in time');
        } catch (err) {
          this.#logger.error({ ...errFields(err), part: part.name }, 'stop: part failed to close');
        } finally {
          clearTimeout(timer);
        }
      }
    })();
    return this.#closing;
  }
}
