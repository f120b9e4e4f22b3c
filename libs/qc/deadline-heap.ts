// A binary min-heap of (deadline, key) pairs: the stale check pops only the sensors whose deadline the watermark
// has passed instead of walking and sorting every sensor (issue 17). Ties break on the key, so the order of what
// comes out does not depend on the order sensors were first seen (replays stay byte-identical). Plain arrays:
// JSON-safe, though callers may as well rebuild it from their per-sensor deadlines after a restore.

export interface DeadlineHeap {
  /** Deadlines, ms, in heap order. */
  readonly d: number[];
  /** Keys, parallel to d. */
  readonly k: string[];
}

export const newDeadlineHeap = (): DeadlineHeap => ({ d: [], k: [] });

const less = (h: DeadlineHeap, i: number, j: number): boolean => {
  const di = h.d[i] as number;
  const dj = h.d[j] as number;
  return di < dj || (di === dj && (h.k[i] as string) < (h.k[j] as string));
};

function swap(h: DeadlineHeap, i: number, j: number): void {
  const d = h.d[i] as number;
  const k = h.k[i] as string;
  h.d[i] = h.d[j] as number;
  h.k[i] = h.k[j] as string;
  h.d[j] = d;
  h.k[j] = k;
}

export function heapPush(h: DeadlineHeap, deadlineMs: number, key: string): void {
  h.d.push(deadlineMs);
  h.k.push(key);
  let i = h.d.length - 1;
  while (i > 0) {
    const parent = (i - 1) >> 1;
    if (!less(h, i, parent)) break;
    swap(h, i, parent);
    i = parent;
  }
}

/** The earliest entry, or undefined when empty. */
export function heapPeek(h: DeadlineHeap): { deadlineMs: number; key: string } | undefined {
  return h.d.length === 0 ? undefined : { deadlineMs: h.d[0] as number, key: h.k[0] as string };
}

/** Removes and returns the earliest entry. */
export function heapPop(h: DeadlineHeap): { deadlineMs: number; key: string } | undefined {
  const top = heapPeek(h);
  if (top === undefined) return undefined;
  const lastD = h.d.pop() as number;
  const lastK = h.k.pop() as string;
  if (h.d.length > 0) {
    h.d[0] = lastD;
    h.k[0] = lastK;
    let i = 0;
    for (;;) {
      const l = 2 * i + 1;
      const r = l + 1;
      let m = i;
      if (l < h.d.length && less(h, l, m)) m = l;
      if (r < h.d.length && less(h, r, m)) m = r;
      if (m === i) break;
      swap(h, i, m);
      i = m;
    }
  }
  return top;
}

export const heapSize = (h: DeadlineHeap): number => h.d.length;
