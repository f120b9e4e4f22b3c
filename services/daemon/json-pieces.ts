// JSON text of a large object in pieces, with the event loop given back between them: the checkpoint of a
// thousand stations is tens of MB of JSON, whose one-piece JSON.stringify (after a structuredClone of the
// state) held the daemon's only thread for about a second. Joined, the pieces are exactly
// JSON.stringify(value): objects down to `depth` are walked key by key (same key order, the same members
// left out), everything below is stringified whole.

export interface Pacing {
  /** Levels of plain objects walked key by key; deeper values (and every array) are one piece each. */
  depth: number;
  /** Work between two yields, ms. */
  sliceMs: number;
  /** Gives the event loop back (a macrotask, so timers and sockets run). */
  yieldNow: () => Promise<void>;
  nowMs?: () => number;
}

/** Yields to the event loop's I/O and timers, not only to microtasks. */
export const yieldToLoop = (): Promise<void> => new Promise((r) => setImmediate(r));

export const DEFAULT_PACING: Pacing = { depth: 3, sliceMs: 8, yieldNow: yieldToLoop };

/** Members JSON.stringify leaves out of an object. */
const omitted = (v: unknown): boolean => v === undefined || typeof v === 'function' || typeof v === 'symbol';

const walkable = (v: unknown): v is Record<string, unknown> =>
  v !== null &&
  typeof v === 'object' &&
  !Array.isArray(v) &&
  typeof (v as { toJSON?: unknown }).toJSON !== 'function';

/**
 * The pieces of JSON.stringify(value), in order. The value must not change until the promise resolves (the
 * caller holds its writer off meanwhile); the pieces are strings, so they stay as they were after that.
 */
export async function stringifyInPieces(value: object, pacing: Pacing = DEFAULT_PACING): Promise<string[]> {
  const now = pacing.nowMs ?? (() => performance.now());
  const out: string[] = [];
  let sliceStart = now();
  const leaf = async (v: unknown): Promise<void> => {
    out.push(JSON.stringify(v));
    if (now() - sliceStart >= pacing.sliceMs) {
      await pacing.yieldNow();
      sliceStart = now();
    }
  };
  const walk = async (v: unknown, depth: number): Promise<void> => {
    if (depth <= 0 || !walkable(v)) return leaf(v);
    let sep = '{';
    for (const key of Object.keys(v)) {
      const member = v[key];
      if (omitted(member)) continue;
      out.push(`${sep}${JSON.stringify(key)}:`);
      sep = ',';
      await walk(member, depth - 1);
    }
    out.push(sep === '{' ? '{}' : '}');
  };
  await walk(value, pacing.depth);
  return out;
}
