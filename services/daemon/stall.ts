// The longest event-loop stall, for /metrics: a timer due every `intervalMs` notes how late each of its ticks
// comes. A late tick means the loop was busy (a checkpoint, a long derivation, a GC pause) and no socket, timer
// or /healthz answer ran meanwhile; the stall is the lateness. A scrape counts as a tick too, so a stall that
// ended just before it is reported in that scrape and not again in the next.
//
// Why not perf_hooks.monitorEventLoopDelay: its reset also forgets the time of the last firing, so a stall
// that begins after a scrape's reset and before the next firing is never recorded; and its resolution is
// added to every delay.
export interface LoopWatch {
  /** The longest stall since the previous take (or the start), seconds; starts the next period. */
  takeStallMaxS(): number;
  /** Ticks so far (a tick ends every stall, so a stall is recorded once a tick follows it). */
  ticks(): number;
  close(): void;
}

/** Default tick interval, ms: fine enough for the 100 ms stall goal, coarse enough to cost nothing. */
export const LOOP_WATCH_INTERVAL_MS = 20;

export function watchEventLoop(
  intervalMs = LOOP_WATCH_INTERVAL_MS,
  nowMs: () => number = () => performance.now(),
): LoopWatch {
  let lastMs = nowMs();
  let maxMs = 0;
  let ticks = 0;
  /** How late the loop comes back now, given the last tick; restarts the count from now. */
  const lateness = (): number => {
    const t = nowMs();
    const late = t - lastMs - intervalMs;
    lastMs = t;
    return late > 0 ? late : 0;
  };
  const timer = setInterval(() => {
    ticks++;
    const late = lateness();
    if (late > maxMs) maxMs = late;
  }, intervalMs);
  timer.unref();
  return {
    takeStallMaxS() {
      const late = lateness();
      const worst = late > maxMs ? late : maxMs;
      maxMs = 0;
      return worst / 1000;
    },
    ticks: () => ticks,
    close: () => clearInterval(timer),
  };
}
