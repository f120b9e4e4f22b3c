// Where the daemon is in its raw archive and in its record stream. The pipeline processes archive lines in
// the order they are in the archive, one after the other, so a checkpoint of the processor can say exactly
// which lines it covers: every line received before `rxMs`, and the first `atRx` lines received at
// `rxMs` (receive times never go backwards in the archive: the pipeline holds them at the last one, so a
// clock stepped back cannot reorder the lines). `nextPos` is the stream position the next derived record
// gets (RecordSink.write): positions count records from the stream's start, so they follow from the
// archive alone and a restart that derives the tail again numbers each record as before. The epoch names
// the stream: it is drawn when a data folder starts without a checkpoint, and an output that holds
// positions of another epoch holds nothing of this stream.
import { createHash, randomBytes } from 'node:crypto';

export interface ArchiveCursor {
  /** Receive time (ms) of the last line covered; undefined before the first line. */
  rxMs: number | undefined;
  /** Lines with exactly that receive time that are covered. */
  atRx: number;
  /** Lines covered since the stream began (for the log and status). */
  lines: number;
}

export interface StreamState {
  epoch: string;
  /**
   * The configuration and version the positions were counted under. A restart under another one starts a
   * new epoch: the archive tail may derive other records now, so their positions are not comparable.
   */
  fingerprint: string;
  cursor: ArchiveCursor;
  /** Position of the next derived record. */
  nextPos: number;
}

export function newStream(fingerprint: string): StreamState {
  return {
    epoch: randomBytes(8).toString('hex'),
    fingerprint,
    cursor: { rxMs: undefined, atRx: 0, lines: 0 },
    nextPos: 0,
  };
}

/** A new epoch for the same place in the archive (the configuration or version changed). */
export function renewEpoch(s: StreamState, fingerprint: string): StreamState {
  return { ...s, epoch: randomBytes(8).toString('hex'), fingerprint };
}

/** What positions depend on besides the archive: the configuration and the code's version. */
export function streamFingerprint(config: unknown, version: string): string {
  return createHash('sha1')
    .update(`${version}\n${JSON.stringify(config)}`)
    .digest('hex')
    .slice(0, 16);
}

/** Moves the cursor past one more line received at `rxMs` (never earlier than the cursor). */
export function advance(c: ArchiveCursor, rxMs: number): void {
  if (c.rxMs === undefined || rxMs > c.rxMs) {
    c.rxMs = rxMs;
    c.atRx = 1;
  } else c.atRx++;
  c.lines++;
}

/** True when the line received at `rxMs`, the `nthAtRx`-th (1-based) with that time, is covered. */
export function covers(c: ArchiveCursor, rxMs: number, nthAtRx: number): boolean {
  if (c.rxMs === undefined) return false;
  return rxMs < c.rxMs || (rxMs === c.rxMs && nthAtRx <= c.atRx);
}

/** A stream read back from a checkpoint; anything malformed gives undefined (a fresh stream then). */
export function parseStream(v: unknown): StreamState | undefined {
  const s = v as Partial<StreamState> | null | undefined;
  const c = s?.cursor;
  if (
    typeof s?.epoch !== 'string' ||
    s.epoch === '' ||
    typeof s.fingerprint !== 'string' ||
    typeof s.nextPos !== 'number' ||
    !Number.isSafeInteger(s.nextPos) ||
    c === undefined ||
    c === null ||
    typeof c.atRx !== 'number' ||
    typeof c.lines !== 'number' ||
    !(c.rxMs === undefined || c.rxMs === null || typeof c.rxMs === 'number')
  )
    return undefined;
  return {
    epoch: s.epoch,
    fingerprint: s.fingerprint,
    nextPos: s.nextPos,
    cursor: { rxMs: c.rxMs ?? undefined, atRx: c.atRx, lines: c.lines },
  };
}
