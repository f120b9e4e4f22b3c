import { describe, it, expect } from 'vitest';
import {
  createDashboardChannel,
  createNotifier,
  NotifyError,
  type NotificationMessage,
  type Timers,
} from './index.js';
import { alert, manualClock, tempDir } from './test-helpers.js';

/** Timers that record the one pending callback and its delay, and fire it on demand. */
function recordingTimers(): Timers & { delay: number | null; fire(): void } {
  let fn: (() => void) | null = null;
  const t = {
    delay: null as number | null,
    set(f: () => void, ms: number) {
      fn = f;
      t.delay = ms;
      return f;
    },
    clear(h: unknown) {
      if (h === fn) {
        fn = null;
        t.delay = null;
      }
    },
    fire() {
      const f = fn;
      fn = null;
      t.delay = null;
      f?.();
    },
  };
  return t;
}

describe('notifier scheduling (the production path: no explicit tick)', () => {
  it('wakes at the end of the group window, then after the backoff, then idles at maxSleepMs', async () => {
    const clock = manualClock();
    const timers = recordingTimers();
    let up = false;
    const seen: NotificationMessage[] = [];
    const ch = {
      ...createDashboardChannel('ui', () => undefined),
      send: async (m: NotificationMessage) => {
        if (!up) throw new NotifyError('REEFD_NOTIFY_WEBHOOK_UNREACHABLE', 'uplink down', true);
        seen.push(m);
      },
    };
    const errors: string[] = [];
    const n = createNotifier({
      dir: await tempDir(),
      site: 'demo-reef',
      clock,
      timers,
      random: () => 0.5,
      channels: [ch],
      retry: { baseMs: 8000, maxMs: 60_000 },
      onError: (e) => errors.push((e as Error).message),
    });
    await n.start();
    expect(timers.delay).toBe(30_000); // idle: maxSleepMs
    await n.enqueue(alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: 'a' }));
    expect(timers.delay).toBe(30_000); // the group window
    clock.advance(12_000);
    await n.enqueue(alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: 'b' }));
    expect(timers.delay).toBe(18_000); // still the first item's window
    clock.advance(18_000);
    timers.fire();
    await n.tick(); // joins the pass the timer started
    expect(errors).toEqual(['REEFD_NOTIFY_WEBHOOK_UNREACHABLE: uplink down']);
    expect(timers.delay).toBe(4000); // backoff: max(base/2, 0.5 x 8 s)
    up = true;
    clock.advance(4000);
    timers.fire();
    await n.tick();
    expect(seen).toHaveLength(1);
    expect(seen[0]!.alerts).toHaveLength(2);
    expect(timers.delay).toBe(30_000);
    await n.stop();
    expect(timers.delay).toBeNull();
  });
});
