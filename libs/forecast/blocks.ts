// Block means on a fixed grid (default 15 min): the forecast's memory of a variable, small and plain JSON.
// A sample joins the block that holds its time, late samples included; old blocks are pruned by age. Blocks
// are kept as their index on the grid, their mean (to 1e-6 of the unit, far below any sensor's resolution, so
// checkpoints stay small) and their count.

export interface Blocks {
  blockMs: number;
  /** Block indices (start = k blockMs), increasing; the block means and sample counts. */
  k: number[];
  v: number[];
  n: number[];
}

const round6 = (x: number) => Math.round(x * 1e6) / 1e6;

export function createBlocks(blockMs = 15 * 60_000): Blocks {
  return { blockMs, k: [], v: [], n: [] };
}

export function addSample(b: Blocks, tMs: number, value: number): void {
  if (!Number.isFinite(value) || !Number.isFinite(tMs)) return;
  const k = Math.floor(tMs / b.blockMs);
  const last = b.k.length - 1;
  let i: number;
  if (last < 0 || k > (b.k[last] as number)) i = b.k.length;
  else {
    let lo = 0;
    let hi = b.k.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((b.k[mid] as number) < k) lo = mid + 1;
      else hi = mid;
    }
    i = lo;
  }
  if (b.k[i] === k) {
    const n = (b.n[i] as number) + 1;
    b.v[i] = round6((b.v[i] as number) + (value - (b.v[i] as number)) / n);
    b.n[i] = n;
  } else {
    b.k.splice(i, 0, k);
    b.v.splice(i, 0, round6(value));
    b.n.splice(i, 0, 1);
  }
}

/** Drops blocks that start before tMs. */
export function pruneBefore(b: Blocks, tMs: number): void {
  let i = 0;
  while (i < b.k.length && (b.k[i] as number) * b.blockMs < tMs) i++;
  if (i > 0) {
    b.k.splice(0, i);
    b.v.splice(0, i);
    b.n.splice(0, i);
  }
}

/** Block centres and means in [fromMs, toMs) (blocks wholly before toMs). */
export function blockMeans(b: Blocks, fromMs = -Infinity, toMs = Infinity): { tMs: number[]; v: number[] } {
  const tMs: number[] = [];
  const v: number[] = [];
  for (let i = 0; i < b.k.length; i++) {
    const s = (b.k[i] as number) * b.blockMs;
    if (s < fromMs || s + b.blockMs > toMs) continue;
    tMs.push(s + b.blockMs / 2);
    v.push(b.v[i] as number);
  }
  return { tMs, v };
}

/** Mean of the blocks wholly inside [fromMs, toMs), or undefined: a forecast issued at toMs reads no sample
 * after it, whenever it is computed. */
export function meanOver(b: Blocks, fromMs: number, toMs: number): number | undefined {
  const m = blockMeans(b, fromMs, toMs).v;
  return m.length ? m.reduce((a, x) => a + x, 0) / m.length : undefined;
}

/** The block mean at the block holding tMs, else linear interpolation between the nearest blocks at most
 * maxGapMs apart, else undefined; only blocks that end by beforeMs (what was known at that time). */
export function valueAt(
  b: Blocks,
  tMs: number,
  maxGapMs = 3 * 3_600_000,
  beforeMs = Infinity,
): number | undefined {
  const centre = (i: number) => ((b.k[i] as number) + 0.5) * b.blockMs;
  let n = b.k.length;
  while (n > 0 && ((b.k[n - 1] as number) + 1) * b.blockMs > beforeMs) n--;
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (centre(mid) < tMs) lo = mid + 1;
    else hi = mid;
  }
  if (lo < n && centre(lo) === tMs) return b.v[lo] as number;
  if (lo === 0 || lo === n) return undefined;
  const t0 = centre(lo - 1);
  const t1 = centre(lo);
  if (t1 - t0 > maxGapMs) return undefined;
  return (b.v[lo - 1] as number) + ((tMs - t0) / (t1 - t0)) * ((b.v[lo] as number) - (b.v[lo - 1] as number));
}

/** The mean of the last block that ended at or before tMs, if it started within maxAgeMs. */
export function latest(b: Blocks, tMs: number, maxAgeMs: number): number | undefined {
  for (let i = b.k.length - 1; i >= 0; i--) {
    const start = (b.k[i] as number) * b.blockMs;
    if (start + b.blockMs > tMs) continue;
    if (tMs - start > maxAgeMs) return undefined;
    return b.v[i] as number;
  }
  return undefined;
}
