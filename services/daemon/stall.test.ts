// The event-loop stall and RSS gauges of /metrics. Each test blocks the loop itself for a measured span and
// waits, bounded by conditions (ticks counted), never by a sleep of a guessed length; the checks are lower
// bounds the stall cannot miss however loaded the machine is (a descheduled process only adds to a stall),
// and an injected clock for exact values.
import { afterEach, describe, expect, it } from 'vitest';
import { createMetrics, type DaemonMetrics } from './metrics.js';
import { LOOP_WATCH_INTERVAL_MS, watchEventLoop, type LoopWatch } from './stall.js';

const BLOCK_MS = 250;
const MAX_TURNS = 500;

const turn = (): Promise<void> => new Promise((r) => setTimeout(r, LOOP_WATCH_INTERVAL_MS));

/** Awaits loop turns until `ok()` holds, at most MAX_TURNS of them. */
async function until(ok: () => boolean, what: string): Promise<void> {
  for (let i = 0; i < MAX_TURNS; i++) {
    if (ok()) return;
    await turn();
  }
  throw new Error(`not seen within ${MAX_TURNS} loop turns: ${what}`);
}

/** Keeps the loop busy for at least `ms` of wall-clock time; returns how long it really was. */
function block(ms: number): number {
  const t0 = performance.now();
  let t = t0;
  while (t - t0 < ms) t = performance.now();
  return t - t0;
}

describe('event-loop watch', () => {
  let watch: LoopWatch | undefined;
  afterEach(() => watch?.close());

  it('reports a stall that ended just before the take', () => {
    const w = (watch = watchEventLoop());
    w.takeStallMaxS();
    const blockedMs = block(BLOCK_MS);
    expect(w.takeStallMaxS()).toBeGreaterThanOrEqual((blockedMs - LOOP_WATCH_INTERVAL_MS) / 1000);
    // That the next period starts from nothing is checked on an injected clock below: on the real one, a
    // loaded machine may deschedule the process between two takes, which counts as a stall.
  });

  it('keeps the longest stall its ticks saw until the next take', async () => {
    const w = (watch = watchEventLoop());
    await until(() => w.ticks() > 0, 'a first tick');
    w.takeStallMaxS();
    const long = block(BLOCK_MS);
    let n = w.ticks();
    await until(() => w.ticks() > n, 'a tick after the long block');
    // A shorter stall after it must not replace it.
    block(BLOCK_MS / 5);
    n = w.ticks();
    await until(() => w.ticks() > n, 'a tick after the short block');
    expect(w.takeStallMaxS()).toBeGreaterThanOrEqual((long - LOOP_WATCH_INTERVAL_MS) / 1000);
  });

  it('computes the stall from the clock it is given: lateness beyond the interval', () => {
    let t = 1000;
    const w = (watch = watchEventLoop(20, () => t));
    t += 20;
    expect(w.takeStallMaxS()).toBe(0); // on time
    t += 20 + 750;
    expect(w.takeStallMaxS()).toBeCloseTo(0.75, 12);
    t += 5;
    expect(w.takeStallMaxS()).toBe(0); // early: the 750 ms stall was reported once
  });
});

describe('/metrics gauges', () => {
  let metrics: DaemonMetrics | undefined;
  afterEach(() => metrics?.close());

  const value = async (m: DaemonMetrics, name: string): Promise<number> => {
    const got = await m.registry.getSingleMetric(name)?.get();
    const v = got?.values[0]?.value;
    if (typeof v !== 'number') throw new Error(`${name} has no value`);
    return v;
  };

  it('exposes the longest stall since the previous scrape in seconds, in the text format', async () => {
    const w = watchEventLoop();
    const m = (metrics = createMetrics(false, undefined, w));
    await m.registry.metrics(); // a scrape: the period starts here
    const blockedMs = block(BLOCK_MS);
    const n = w.ticks();
    await until(() => w.ticks() > n, 'a tick after the block');
    const text = await m.registry.metrics();
    const line = text.split('\n').find((l) => l.startsWith('reefd_event_loop_stall_max_seconds '));
    expect(line).toBeDefined();
    expect(Number(line!.split(' ')[1])).toBeGreaterThanOrEqual((blockedMs - LOOP_WATCH_INTERVAL_MS) / 1000);
    expect(text).toContain('# TYPE reefd_event_loop_stall_max_seconds gauge');
  });

  it('exposes the resident set size and its peak in bytes', async () => {
    const m = (metrics = createMetrics(false));
    const heapUsed = process.memoryUsage().heapUsed;
    const rss = await value(m, 'reefd_memory_rss_bytes');
    const peak = await value(m, 'reefd_memory_rss_peak_bytes');
    const rssAfter = process.memoryUsage.rss();
    // The JS heap in use lives inside the resident set; the peak is never below a reading taken before it.
    expect(rss).toBeGreaterThan(heapUsed);
    expect(peak).toBeGreaterThanOrEqual(rss);
    // Bytes, not kilobytes: within a factor of two of the process's own reading a moment later.
    expect(rss).toBeGreaterThan(rssAfter / 2);
    expect(peak).toBeLessThan(rssAfter * 64);
  });
});
