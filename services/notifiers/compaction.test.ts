import { describe, it, expect } from 'vitest';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { createDashboardChannel, createNotifier, type NotificationMessage } from './index.js';
import { alert, idleTimers, manualClock, tempDir } from './test-helpers.js';

describe('journal compaction', () => {
  it('keeps queued items, episodes and acks across a compaction and a restart, and forgets old cleared ones', async () => {
    const dir = await tempDir();
    const clock = manualClock();
    let up = false;
    const seen: NotificationMessage[] = [];
    const flaky = {
      ...createDashboardChannel('ui', (m) => seen.push(m)),
      send: async (m: NotificationMessage) => {
        if (!up) throw new Error('down');
        seen.push(m);
      },
    };
    const mk = () =>
      createNotifier({
        dir,
        site: 'demo-reef',
        clock,
        timers: idleTimers,
        channels: [flaky],
        compactAfterLines: 5,
        keepClearedMs: 86_400_000,
        renotifyMs: 0,
      });
    const n = mk();
    await n.start();
    const old = alert({ rule: 'spike', station: 'crest', t: new Date(clock.ms).toISOString() });
    up = true;
    await n.enqueue(old);
    await n.enqueue({ ...old, state: 'cleared' });
    clock.advance(31_000);
    await n.tick();
    expect(seen).toHaveLength(2);
    up = false;
    clock.advance(2 * 86_400_000); // the spike episode is now old, cleared and delivered
    const live = [1, 2, 3, 4, 5, 6].map((i) =>
      alert({ rule: 'stale', fault: 'stale', station: 'back', sensor: `s${i}` }),
    );
    for (const a of live) await n.enqueue(a);
    expect((await n.ack(live[0]!.id, 'ana')).ok).toBe(true);
    clock.advance(31_000);
    await n.tick(); // send fails; the pass compacts (> 5 lines)
    const text = await readFile(join(dir, 'outbox.jsonl'), 'utf8');
    expect(
      text
        .split('\n')
        .filter(Boolean)
        .map((l) => (JSON.parse(l) as { op: string }).op),
    ).toEqual(['snap']);
    await n.stop();

    const n2 = mk();
    await n2.start();
    expect(n2.status().pending).toEqual({ ui: 6 });
    const eps = n2.status().episodes;
    expect(eps.map((e) => e.id).sort()).toEqual(live.map((a) => a.id).sort()); // the old spike is forgotten
    expect(eps.find((e) => e.id === live[0]!.id)?.ack?.by).toBe('ana');
    up = true;
    clock.advance(3_600_000);
    await n2.tick();
    expect(seen.slice(2).flatMap((m) => m.alerts.map((a) => a.sensor))).toEqual([
      's1',
      's2',
      's3',
      's4',
      's5',
      's6',
    ]);
    await n2.stop();
  });
});
