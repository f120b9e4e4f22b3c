// Shared by the benchmark scenarios: CPU time per call, bytes allocated per call, and the summary rows
// that `npm run bench` (run.ts) gathers from every scenario into one table.
import { GCProfiler, getHeapStatistics } from 'node:v8';

/**
 * Microseconds of CPU time per call (process.cpuUsage, user + system: a shared, loaded machine deschedules
 * this process, which wall-clock time would count). The cases run interleaved, round by round, so each
 * sees the same machine state; the median of the rounds is returned, in the order given.
 */
export function cpuMicros(
  cases: readonly { label: string; iter: number; fn: () => unknown }[],
  rounds = 7,
  print = true,
): number[] {
  let sink = 0;
  for (const c of cases) for (let i = 0; i < Math.min(c.iter, 300); i++) sink += c.fn() === undefined ? 0 : 1;
  const got: number[][] = cases.map(() => []);
  for (let r = 0; r < rounds; r++) {
    cases.forEach((c, j) => {
      const t0 = process.cpuUsage();
      for (let i = 0; i < c.iter; i++) sink += c.fn() === undefined ? 0 : 1;
      const d = process.cpuUsage(t0);
      (got[j] as number[]).push((d.user + d.system) / c.iter);
    });
  }
  if (sink < 0) console.log(sink);
  return got.map((xs, j) => {
    const us = median(xs);
    if (print)
      console.log(`${(cases[j] as { label: string }).label.padEnd(56)} ${us.toFixed(2).padStart(9)} us`);
    return us;
  });
}

export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? NaN;
}

/**
 * Bytes allocated on the JS heap per call of `fn`: the growth of the used heap over `iter` calls that no
 * collection interrupted (a GC profiler watches each try; a try with a GC is repeated with fewer calls).
 * Median of 5 clean tries. Counts what the calls allocate and drop, which is what the GC must clear.
 */
export function bytesPerCall(fn: (i: number) => unknown, iter = 200, warmup = 2000): number {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (gc === undefined) throw new Error('REEFD_BENCH_NO_GC: run with --expose-gc (npm run bench does)');
  for (let i = 0; i < warmup; i++) fn(i); // warm-up: unoptimised code boxes every number it computes
  const tries: number[] = [];
  let n = iter;
  let keep: unknown;
  for (let attempt = 0; tries.length < 5 && attempt < 40; attempt++) {
    gc();
    const prof = new GCProfiler();
    prof.start();
    const h0 = getHeapStatistics().used_heap_size;
    for (let i = 0; i < n; i++) keep = fn(i);
    const h1 = getHeapStatistics().used_heap_size;
    const events = prof.stop()?.statistics.length ?? 0;
    if (events === 0) tries.push((h1 - h0) / n);
    else n = Math.max(1, Math.floor(n / 2));
  }
  if (keep === Symbol.for('never')) console.log(keep);
  return median(tries);
}

/** One row of the summary table (issue 17's table): printed as a tagged JSON line run.ts collects. */
export interface SummaryRow {
  /** Which row of the table: intake, ack, latency, replay, burst, rss, stall, memory. */
  id: string;
  what: string;
  baseline: string;
  measured: string;
  /** measured / baseline (or the ratio the goal is stated in); NaN when not measurable here. */
  ratio: number;
  goal: string;
  met: boolean | 'n/a';
  note?: string;
}

export const ROW_TAG = '@@bench-row ';

export function summaryRow(row: SummaryRow): void {
  console.log(ROW_TAG + JSON.stringify(row));
}
