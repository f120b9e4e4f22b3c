// Processor checkpoints: the state as JSON, written atomically (temp file, fsync, rename, fsync of the folder),
// so a crash leaves either the old or the new checkpoint, never half of one.
import { mkdir, open, readFile, rename } from 'node:fs/promises';
import path from 'node:path';
import { ReefdError } from '../../libs/contract/index.js';
import type { ProcessorState } from '../../libs/processor/index.js';

/**
 * Replaces `file` with `text` so that a crash leaves the old or the new content, never a mix: a temp file
 * (mode 0600), fsync, rename, fsync of the folder. Shared by the checkpoint and the dashboard history.
 */
export async function writeFileAtomic(file: string, text: string): Promise<void> {
  await mkdir(path.dirname(file), { recursive: true });
  const tmp = `${file}.tmp-${process.pid}`;
  const fh = await open(tmp, 'w', 0o600);
  try {
    await fh.writeFile(text);
    await fh.sync();
  } finally {
    await fh.close();
  }
  await rename(tmp, file);
  const dir = await open(path.dirname(file), 'r');
  try {
    await dir.sync();
  } finally {
    await dir.close();
  }
}

export async function writeCheckpoint(file: string, state: ProcessorState): Promise<void> {
  await writeFileAtomic(file, JSON.stringify({ savedAt: new Date().toISOString(), state }));
}

/**
 * Reads a checkpoint. A missing file is a cold start (undefined); an unreadable one is moved aside as
 * `<file>.corrupt-<time>` and also gives a cold start, with a REEFD_CHECKPOINT_CORRUPT warning for the log.
 */
export async function readCheckpoint(
  file: string,
): Promise<{ state?: ProcessorState; warning?: ReefdError }> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return {};
    throw err;
  }
  try {
    const parsed = JSON.parse(text) as { state?: ProcessorState };
    if (parsed.state === undefined || typeof parsed.state !== 'object') throw new Error('no state');
    return { state: parsed.state };
  } catch (err) {
    const aside = `${file}.corrupt-${Date.now()}`;
    await rename(file, aside);
    return {
      warning: new ReefdError(
        'REEFD_CHECKPOINT_CORRUPT',
        `checkpoint ${file} unreadable (${(err as Error).message}); kept as ${aside}`,
      ),
    };
  }
}
