// Processor checkpoints: the state and the stream it covers (cursor.ts) as JSON, written atomically (temp file,
// fsync, rename, fsync of the folder), so a crash leaves either the old or the new checkpoint, never half.
// The text is made in pieces with the event loop given back between them (json-pieces.ts): a checkpoint is
// tens of MB at a thousand stations, and made in one go it held the daemon's only thread for a second.
import { readFile, rename } from 'node:fs/promises';
import { ReefdError } from '../../libs/contract/index.js';
import type { ProcessorState } from '../../libs/processor/index.js';
import { writeFileAtomic } from '../sinks/atomic-file.js';
import { parseStream, type StreamState } from './cursor.js';
import { DEFAULT_PACING, stringifyInPieces, type Pacing } from './json-pieces.js';

export { writeFileAtomic };

/** The live daemon's wall-clock state (the site's dead-man), kept beside the processor's. */
export interface LiveState {
  silence?: unknown;
}

/**
 * The checkpoint's text, in pieces. `state` may be the processor's live state: it must not change until the
 * promise resolves (the daemon holds its processor at rest meanwhile); the pieces are a copy.
 */
export function checkpointPieces(
  state: ProcessorState,
  stream: StreamState,
  live?: LiveState,
  pacing: Pacing = DEFAULT_PACING,
): Promise<string[]> {
  // The state is one level below the top: the stations' series are walked one by one.
  const doc = { savedAt: new Date().toISOString(), stream, ...live, state };
  return stringifyInPieces(doc, { ...pacing, depth: pacing.depth + 1 });
}

/** Writes a checkpoint made of the state now (see checkpointPieces for `state`). */
export async function writeCheckpoint(
  file: string,
  state: ProcessorState,
  stream: StreamState,
  live?: LiveState,
): Promise<void> {
  await writeFileAtomic(file, await checkpointPieces(state, stream, live));
}

export interface CheckpointRead {
  state?: ProcessorState;
  /** The stream the state covers; absent for a checkpoint of an earlier version. */
  stream?: StreamState;
  /** Receive time an earlier version's checkpoint covered (lines from it on are fed again). */
  legacyRxMs?: number;
  /** The dead-man's state as saved (checked by its reader). */
  silence?: unknown;
  warning?: ReefdError;
}

/**
 * Reads a checkpoint. A missing file is a cold start (undefined); an unreadable one is moved aside as
 * `<file>.corrupt-<time>` and also gives a cold start, with a REEFD_CHECKPOINT_CORRUPT warning for the log.
 */
export async function readCheckpoint(file: string): Promise<CheckpointRead> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return {};
    throw err;
  }
  try {
    const parsed = JSON.parse(text) as {
      state?: ProcessorState & { lastRxMs?: unknown };
      stream?: unknown;
      silence?: unknown;
    };
    if (parsed.state === undefined || typeof parsed.state !== 'object' || parsed.state === null)
      throw new Error('no state');
    const stream = parseStream(parsed.stream);
    if (stream !== undefined)
      return parsed.silence === undefined
        ? { state: parsed.state, stream }
        : { state: parsed.state, stream, silence: parsed.silence };
    const legacy = parsed.state.lastRxMs;
    return typeof legacy === 'number' ? { state: parsed.state, legacyRxMs: legacy } : { state: parsed.state };
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
