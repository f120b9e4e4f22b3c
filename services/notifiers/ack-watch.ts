// Watches the acknowledgement journal for lines other processes append (`reefd alerts ack` writes there
// directly), so a running daemon learns of them in about a second instead of at its next pass (up to 30 s).
// fs.watch (inotify on Linux) can miss or merge events, so the notifier's own pass still reads the journal:
// the watch only makes the common case fast, it is never the only path.
import { watch, type FSWatcher } from 'node:fs';
import { mkdirSync } from 'node:fs';
import { ACKS_FILE } from './outbox-state.js';

export interface AckWatch {
  close(): void;
}

/**
 * Calls `onChange` (at most once per `debounceMs`) when the acks journal in `dir` changes. The folder is
 * watched rather than the file, so a journal created after the watch starts is seen too.
 */
export function watchAcks(
  dir: string,
  onChange: () => void,
  opts: { debounceMs?: number; onError?: (err: unknown) => void } = {},
): AckWatch {
  const debounceMs = opts.debounceMs ?? 200;
  mkdirSync(dir, { recursive: true });
  let timer: NodeJS.Timeout | undefined;
  let watcher: FSWatcher | undefined;
  try {
    watcher = watch(dir, { persistent: false }, (_event, name) => {
      if (name !== null && name !== ACKS_FILE) return;
      if (timer !== undefined) return;
      timer = setTimeout(() => {
        timer = undefined;
        onChange();
      }, debounceMs);
    });
    watcher.on('error', (err) => opts.onError?.(err));
  } catch (err) {
    // No watch (a file system without notifications): the notifier's passes still pick the acks up.
    opts.onError?.(err);
  }
  return {
    close() {
      clearTimeout(timer);
      watcher?.close();
    },
  };
}
