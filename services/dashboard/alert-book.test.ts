import { describe, expect, it } from 'vitest';
import type { AlertRecord } from '../../libs/alerts/index.js';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { run as cli } from '../cli/commands/alerts.js';
import { alertsStateDir, createDashboardChannel, createNotifier } from '../notifiers/index.js';
import { manualClock, idleTimers, alert, tempDir } from '../notifiers/test-helpers.js';
import { AlertBook, alertIdOf, alertUnit } from './alert-book.js';

const H = 3_600_000;
const asRecords = (a: AlertRecord[]) => a as unknown as DerivedRecord[];

async function notifierIn(data: string) {
  const n = createNotifier({
    dir: alertsStateDir(data),
    site: 'ornen-reef',
    clock: manualClock(),
    timers: idleTimers,
    channels: [createDashboardChannel('ui', () => undefined)],
  });
  await n.start();
  return n;
}

const io = () => {
  const o = {
    out: '',
    err: '',
    env: {},
    isTty: false,
    stdout: (t: string) => void (o.out += t),
    stderr: (t: string) => void (o.err += t),
  };
  return o;
};

describe('AlertBook', () => {
  it('lists raised alerts first with the unit and words of their metric', () => {
    const book = new AlertBook({ windowMs: 48 * H });
    const low = alert({
      rule: 'low_oxygen',
      station: 'lagoon',
      metric: 'oxygen.o2_mg_l',
      value: 1.42,
      limit: 2,
      severity: 'critical',
    });
    const stale = alert({
      rule: 'stale',
      fault: 'stale',
      station: 'lagoon',
      sensor: 'ctd-lagoon',
      value: 900,
      limit: 900,
    });
    const changed = book.observe(
      asRecords([
        low,
        stale,
        { ...stale, state: 'cleared', t: new Date(Date.parse(stale.t) + H).toISOString(), value: 5700 },
      ]),
    );
    expect(changed.map((v) => v.id).sort()).toEqual([low.id, stale.id].sort());
    const [first, second] = book.list();
    expect(first).toMatchObject({
      id: low.id,
      state: 'raised',
      unit: 'mg L-1',
      label: 'dissolved oxygen',
      value: 1.42,
      limit: 2,
      can_ack: false,
    });
    expect(second).toMatchObject({
      id: stale.id,
      state: 'cleared',
      unit: 's',
      value: 5700,
      raised_t: stale.t,
      cleared_t: expect.any(String),
    });
    expect(alertUnit({ rule: 'battery', fault: 'battery' })).toEqual({ unit: 'V', label: 'supply voltage' });
    // The trend warning's value is the hours left to the cut-off, whatever its metric (pco2.battery_v).
    expect(alertUnit({ rule: 'battery_trend', fault: 'battery', metric: 'pco2.battery_v' }).unit).toBe('h');
  });

  it('acknowledges through the notifier by name with a comment, refuses cleared ones, and shows CLI acks', async () => {
    const data = await tempDir();
    const n = await notifierIn(data);
    const low = alert({ rule: 'low_oxygen', station: 'lagoon', metric: 'oxygen.o2_mg_l', value: 1.4 });
    const omega = alert({
      rule: 'low_omega_ar',
      station: 'lagoon',
      metric: 'carbonate.omega_ar',
      value: 2.7,
      limit: 3,
    });
    const spike = alert({ rule: 'spike', fault: 'spike', station: 'crest', sensor: 'o2-crest' });
    const spikeClear = {
      ...spike,
      state: 'cleared' as const,
      t: new Date(Date.parse(spike.t) + H).toISOString(),
    };
    for (const a of [low, omega, spike, spikeClear]) await n.enqueue(a);
    // The book starts from the notifier's durable episodes (a restart of the page's daemon).
    const book = new AlertBook({ windowMs: 48 * H, acks: n });
    const seen: string[] = [];
    n.onAck((e) => {
      const v = book.applyAck(e);
      if (v) seen.push(`${v.id}:${v.ack?.by}:${v.ack?.comment}`);
    });
    expect(book.get(low.id)?.can_ack).toBe(true);
    expect(book.get(spike.id)).toMatchObject({ state: 'cleared', can_ack: false });

    const ok = await book.ack(low.id, 'Mika', 'divers at dawn');
    expect(ok).toMatchObject({
      ok: true,
      alert: { ack: { by: 'Mika', comment: 'divers at dawn' }, can_ack: false },
    });
    expect(await book.ack(spike.id, 'Mika', undefined)).toMatchObject({
      ok: false,
      status: 409,
      code: 'REEFD_NOTIFY_ALERT_CLEARED',
    });
    expect(await book.ack('nope', 'Mika', undefined)).toMatchObject({ ok: false, status: 404 });

    // The CLI writes the same journal; the notifier reads it and the book shows it.
    const k = io();
    expect(
      await cli(['ack', omega.id, '--data', data, '--by', 'Ana', '--comment', 'sampling at noon'], k),
    ).toBe(0);
    await n.syncAcks();
    expect(book.get(omega.id)?.ack).toMatchObject({ by: 'Ana', comment: 'sampling at noon' });
    expect(seen).toEqual([`${low.id}:Mika:divers at dawn`, `${omega.id}:Ana:sampling at noon`]);
    // And the CLI sees the page's acknowledgement.
    const l = io();
    await cli(['list', '--data', data], l);
    expect(l.out).toContain(`acked by Mika`);
    expect(l.out).toContain('"divers at dawn"');
    await n.stop();
  });

  it('gives a record without an id the id the notifier gives it', async () => {
    const a = alert({ rule: 'reefd.disk_full', station: 'x' }) as Partial<AlertRecord>;
    delete a.id;
    const n = await notifierIn(await tempDir());
    await n.enqueue(a as AlertRecord);
    expect(n.status().episodes.map((e) => e.id)).toEqual([alertIdOf(a as AlertRecord)]);
    await n.stop();
  });
});
