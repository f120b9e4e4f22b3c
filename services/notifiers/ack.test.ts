import { describe, it, expect, afterEach } from 'vitest';
import {
  alertsStateDir,
  appendAck,
  createDashboardChannel,
  createNotifier,
  loadOutboxState,
  watchAcks,
  type AckEvent,
} from './index.js';
import { alert, idleTimers, manualClock, tempDir } from './test-helpers.js';

const cleanups: (() => Promise<void> | void)[] = [];
afterEach(async () => {
  while (cleanups.length) await cleanups.pop()!();
});

async function started(dir: string) {
  const clock = manualClock();
  const n = createNotifier({
    dir,
    site: 'demo-reef',
    clock,
    timers: idleTimers,
    channels: [createDashboardChannel('ui', () => undefined)],
  });
  await n.start();
  cleanups.push(() => n.stop());
  return { n, clock };
}

describe('acknowledgements by a named person with a comment', () => {
  it('keeps the comment, refuses a cleared alert, and tells listeners once', async () => {
    const dir = await tempDir();
    const { n, clock } = await started(dir);
    const seen: AckEvent[] = [];
    const off = n.onAck((e) => seen.push(e));
    const low = alert({ rule: 'low_oxygen', station: 'lagoon', metric: 'oxygen.o2_mg_l', value: 1.4 });
    const stale = alert({ rule: 'stale', fault: 'stale', station: 'back', sensor: 'ctd-back' });
    await n.enqueue(low);
    await n.enqueue(stale);
    await n.enqueue({ ...stale, state: 'cleared', t: new Date(clock.ms + 60_000).toISOString() });

    const r = await n.ack(low.id, 'Mika Aro', '  diver checks the optode at 06:00 ');
    expect(r).toEqual({
      ok: true,
      id: low.id,
      by: 'Mika Aro',
      already: false,
      comment: 'diver checks the optode at 06:00',
    });
    // A second ack does not overwrite the first, and reports who it was.
    expect(await n.ack(low.id, 'Ben', 'me too')).toMatchObject({ already: true, by: 'Mika Aro' });
    expect(await n.ack(stale.id, 'Ben')).toMatchObject({ ok: false, code: 'REEFD_NOTIFY_ALERT_CLEARED' });
    expect(seen).toEqual([
      { id: low.id, by: 'Mika Aro', atMs: clock.ms, comment: 'diver checks the optode at 06:00' },
    ]);
    off();
    // The journal is the one truth: a fresh read (what the CLI does) sees the same ack and comment.
    const st = (await loadOutboxState(dir)).state;
    expect(st.episodes.get(low.id)?.ack).toEqual({
      by: 'Mika Aro',
      atMs: clock.ms,
      comment: 'diver checks the optode at 06:00',
    });
    expect(st.episodes.get(stale.id)?.ack).toBeUndefined();
  });

  it('announces an ack another process appended (the CLI) on syncAcks, and the watch calls for it', async () => {
    const data = await tempDir();
    const dir = alertsStateDir(data);
    const { n } = await started(dir);
    const a = alert({ rule: 'low_omega_ar', station: 'crest' });
    await n.enqueue(a);
    const seen: AckEvent[] = [];
    n.onAck((e) => seen.push(e));
    let changes = 0;
    let resolveChange: () => void = () => undefined;
    const changed = new Promise<void>((r) => (resolveChange = r));
    const w = watchAcks(
      dir,
      () => {
        changes++;
        resolveChange();
      },
      { debounceMs: 10 },
    );
    cleanups.push(() => w.close());
    await appendAck(dir, { op: 'ack', id: a.id, by: 'ana', at: 1234, comment: 'seen from the boat' });
    await changed; // inotify: bounded by the test timeout, never by a sleep
    expect(changes).toBeGreaterThanOrEqual(1);
    expect(seen).toEqual([]); // not applied until read
    await n.syncAcks();
    await n.syncAcks(); // reading again announces nothing new
    expect(seen).toEqual([{ id: a.id, by: 'ana', atMs: 1234, comment: 'seen from the boat' }]);
    expect(n.status().episodes.find((e) => e.id === a.id)?.ack?.comment).toBe('seen from the boat');
  });
});
