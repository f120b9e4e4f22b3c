// Block means on a fixed grid (default 15 min): the forecast's memory of a variable, small and plain JSON.
// A sample joins the block that holds its time, late samples included; old blocks are pruned by age.

export interface Blocks {
  blockMs: number;
  /** Block start times (ms, multiples of blockMs), increasing; running sums and counts. */
  t: number[];
  sum: number[];
  n: number[];
}

export function createBlocks(blockMs = 15 * 60_000): Blocks {
  return { blockMs, t: [], sum: [], n: [] };
}

export function addSample(b: Blocks, tMs: number, value: number): void {
  if (!Number.isFinite(value) || !Number.isFinite(tMs)) return;
  const start = Math.floor(tMs / b.blockMs) * b.blockMs;
  const last = b.t.length - 1;
  if (last < 0 || start > (b.t[last] as number)) {
    b.t.push(start);
    b.sum.push(value);
    b.n.push(1);
    return;
  }
  let lo = 0;
  let hi = b.t.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((b.t[mid] as number) < start) lo = mid + 1;
    else hi = mid;
  }
  if (b.t[lo] === start) {
    b.sum[lo] = (b.sum[lo] as number) + value;
    b.n[lo] = (b.n[lo] as number) + 1;
  } else {
    b.t.splice(lo, 0, start);
    b.sum.splice(lo, 0, value);
    b.n.splice(lo, 0, 1);
  }
}

/** Drops blocks that start before tMs. */
export function pruneBefore(b: Blocks, tMs: number): void {
  let i = 0;
  while (i < b.t.length && (b.t[i] as number) < tMs) i++;
  if (i > 0) {
    b.t.splice(0, i);
    b.sum.splice(0, i);
    b.n.splice(0, i);
  }
}

/** Block centres and means in [fromMs, toMs) (blocks wholly before toMs). */
export function blockMeans(b: Blocks, fromMs = -Infinity, toMs = Infinity): { tMs: number[]; v: number[] } {
  const tMs: number[] = [];
  const v: number[] = [];
  for (let i = 0; i < b.t.length; i++) {
    const s = b.t[i] as number;
    if (s < fromMs || s + b.blockMs > toMs) continue;
    tMs.push(s + b.blockMs / 2);
    v.push((b.sum[i] as number) / (b.n[i] as number));
  }
  return { tMs, v };
}

/** Mean of the blocks whose centres fall in [fromMs, toMs), or undefined. */
export function meanOver(b: Blocks, fromMs: number, toMs: number): number | undefined {
  const m = blockMeans(b, fromMs - b.blockMs / 2, toMs + b.blockMs / 2).v;
  return m.length ? m.reduce((a, x) => a + x, 0) / m.length : undefined;
}

/** The block mean at the block holding tMs, else linear interpolation between the nearest blocks at most
 * maxGapMs apart, else undefined. */
export function valueAt(b: Blocks, tMs: number, maxGapMs = 3 * 3_600_000): number | undefined {
  const centre = (i: number) => (b.t[i] as number) + b.blockMs / 2;
  const mean = (i: number) => (b.sum[i] as number) / (b.n[i] as number);
  let lo = 0;
  let hi = b.t.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (centre(mid) < tMs) lo = mid + 1;
    else hi = mid;
  }
  if (lo < b.t.length && centre(lo) === tMs) return mean(lo);
  if (lo === 0 || lo === b.t.length) return undefined;
  const t0 = centre(lo - 1);
  const t1 = centre(lo);
  if (t1 - t0 > maxGapMs) return undefined;
  return mean(lo - 1) + ((tMs - t0) / (t1 - t0)) * (mean(lo) - mean(lo - 1));
}
