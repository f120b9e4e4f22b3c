import { describe, it, expect } from 'vitest';
import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  alertsStateDir,
  createDashboardChannel,
  createNotifier,
  loadOutboxState,
} from '../../notifiers/index.js';
import { alert, idleTimers, manualClock } from '../../notifiers/test-helpers.js';
import { run } from './alerts.js';
import type { CliIo } from '../io.js';

function io(env: Record<string, string> = {}): CliIo & { out: string; err: string } {
  const o = {
    out: '',
    err: '',
    env,
    isTty: false,
    stdout: (t: string) => void (o.out += t),
    stderr: (t: string) => void (o.err += t),
  };
  return o;
}

describe('reefd alerts list | ack', () => {
  it('lists active alerts from the data folder and acknowledges one by id prefix', async () => {
    const data = await mkdtemp(join(tmpdir(), 'reefd-cli-alerts-'));
    const clock = manualClock();
    const n = createNotifier({
      dir: alertsStateDir(data),
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      channels: [createDashboardChannel('ui', () => undefined)],
    });
    await n.start();
    const a = alert({
      rule: 'low_oxygen',
      station: 'crest',
      metric: 'oxygen.o2_mg_l',
      value: 1.7,
      severity: 'critical',
    });
    const b = alert({ rule: 'stale', fault: 'stale', station: 'back', sensor: 'ctd' });
    await n.enqueue(a);
    await n.enqueue(b);
    await n.enqueue({ ...b, state: 'cleared' });
    await n.stop();

    const l = io();
    expect(await run(['list', '--data', data], l)).toBe(0);
    expect(l.out).toBe(
      `${a.id}  ${a.t}  critical low_oxygen crest oxygen.o2_mg_l value 1.7 mg L-1  raised\nqueued: ui 3\n`,
    );
    const all = io();
    await run(['list', '--data', data, '--all', '--json'], all);
    expect((JSON.parse(all.out) as { alerts: unknown[] }).alerts).toHaveLength(2);

    const k = io({ USER: 'ana' });
    expect(await run(['ack', a.id.slice(0, 5), '--data', data], k)).toBe(0);
    expect(k.out).toBe(`acknowledged ${a.id} (low_oxygen at crest) by ana\n`);
    expect((await loadOutboxState(alertsStateDir(data))).state.episodes.get(a.id)?.ack?.by).toBe('ana');
    const again = io();
    expect(await run(['ack', a.id, '--data', data, '--by', 'ben'], again)).toBe(0);
    expect(again.out).toMatch(/already acknowledged by ana/);

    // A cleared alert is not offered for acknowledgement, from any path.
    const cleared = io({ USER: 'ana' });
    expect(await run(['ack', b.id, '--data', data], cleared)).toBe(1);
    expect(cleared.err).toMatch(/REEFD_NOTIFY_ALERT_CLEARED/);
    expect((await loadOutboxState(alertsStateDir(data))).state.episodes.get(b.id)?.ack).toBeUndefined();

    const bad = io();
    expect(await run(['ack', 'ffffffff', '--data', data], bad)).toBe(1);
    expect(bad.err).toMatch(/REEFD_NOTIFY_UNKNOWN_ALERT/);
    expect(await run(['list'], io())).toBe(2);
    expect(await run(['frob', '--data', data], io())).toBe(2);
  });

  it('acknowledges with a comment by a named person, and asks for a name when there is none', async () => {
    const data = await mkdtemp(join(tmpdir(), 'reefd-cli-alerts-'));
    const n = createNotifier({
      dir: alertsStateDir(data),
      site: 'demo-reef',
      clock: manualClock(),
      timers: idleTimers,
      channels: [createDashboardChannel('ui', () => undefined)],
    });
    await n.start();
    const a = alert({ rule: 'low_oxygen', station: 'lagoon', metric: 'oxygen.o2_mg_l', value: 1.4 });
    await n.enqueue(a);
    await n.stop();
    const anonymous = io();
    expect(await run(['ack', a.id, '--data', data], anonymous)).toBe(2);
    expect(anonymous.err).toMatch(/--by NAME/);
    const k = io();
    expect(
      await run(['ack', a.id, '--data', data, '--by', 'Mika', '--comment', 'night dive at 05:00'], k),
    ).toBe(0);
    const ep = (await loadOutboxState(alertsStateDir(data))).state.episodes.get(a.id);
    expect(ep?.ack).toMatchObject({ by: 'Mika', comment: 'night dive at 05:00' });
    const l = io();
    await run(['list', '--data', data], l);
    expect(l.out).toContain('acked by Mika');
    expect(l.out).toContain('"night dive at 05:00"');
  });

  it('a running notifier picks up an ack written by the CLI and stops reminding', async () => {
    const data = await mkdtemp(join(tmpdir(), 'reefd-cli-alerts-'));
    const clock = manualClock();
    const seen: string[] = [];
    const n = createNotifier({
      dir: alertsStateDir(data),
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      renotifyMs: 3_600_000,
      channels: [createDashboardChannel('ui', (m) => seen.push(m.kind))],
    });
    await n.start();
    const a = alert({ rule: 'low_omega_ar', station: 'crest' });
    await n.enqueue(a);
    clock.advance(31_000);
    await n.tick();
    expect(await run(['ack', a.id, '--data', data, '--by', 'ana'], io())).toBe(0);
    for (let i = 0; i < 4; i++) {
      clock.advance(3_600_000);
      await n.tick();
    }
    await n.stop();
    expect(seen).toEqual(['alerts']);
    expect(n.status().episodes[0]!.ack?.by).toBe('ana');
  });
});
