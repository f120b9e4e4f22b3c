import { describe, it, expect, afterEach } from 'vitest';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import {
  createDashboardChannel,
  createNotifier,
  createWebhookChannel,
  webhookSignature,
  SIGNATURE_HEADER,
  TIMESTAMP_HEADER,
  type NotificationMessage,
} from './index.js';
import { alert, idleTimers, manualClock, tempDir } from './test-helpers.js';

const S = 1000;
const H = 3_600_000;
const cleanups: (() => Promise<void>)[] = [];
afterEach(async () => {
  while (cleanups.length) await cleanups.pop()!();
});

const body = (req: IncomingMessage): Promise<string> =>
  new Promise((res) => {
    let s = '';
    req.on('data', (d: Buffer) => (s += d.toString('utf8')));
    req.on('end', () => res(s));
  });

describe('outbox over a webhook that goes down and comes back', () => {
  it('delivers everything, exactly the queued alerts, across failures and a restart', async () => {
    const dir = await tempDir();
    const clock = manualClock();
    let mode: 'fail' | 'ok' = 'fail';
    const got: { body: string; sig: string | undefined; ts: string | undefined }[] = [];
    let hits = 0;
    const handler = async (req: IncomingMessage, res: ServerResponse) => {
      const b = await body(req);
      hits++;
      if (mode === 'fail') {
        res.writeHead(503).end();
        return;
      }
      got.push({
        body: b,
        sig: req.headers[SIGNATURE_HEADER.toLowerCase()] as string,
        ts: req.headers[TIMESTAMP_HEADER.toLowerCase()] as string,
      });
      res.writeHead(204).end();
    };
    let server: Server = createServer((q, r) => void handler(q, r));
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    const port = (server.address() as AddressInfo).port;
    cleanups.push(() => new Promise((r) => server.close(() => r())));
    const mk = () =>
      createNotifier({
        dir,
        site: 'demo-reef',
        clock,
        timers: idleTimers,
        random: () => 0.5,
        channels: [
          createWebhookChannel({
            id: 'hook',
            url: `http://127.0.0.1:${port}/in`,
            secret: 's3cret',
            site: 'demo-reef',
            now: clock.now,
          }),
        ],
      });
    let n = mk();
    await n.start();
    const sent = [
      ...Array.from({ length: 3 }, (_, i) =>
        alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: `s${i}` }),
      ),
      alert({ rule: 'low_oxygen', station: 'back', severity: 'critical', metric: 'oxygen.o2_mg_l' }),
    ];
    for (const a of sent) await n.enqueue(a);
    clock.advance(31 * S);
    await n.tick(); // 503
    expect(hits).toBe(1); // the first group failed; the pass stops there for this channel
    await n.tick(); // inside the backoff: no request
    expect(hits).toBe(1);
    clock.advance(10 * S);
    await n.tick(); // 503 again
    expect(hits).toBe(2);
    expect(n.status().pending).toEqual({ hook: 4 });

    // The receiver goes away entirely (connection refused), the daemon restarts meanwhile.
    await new Promise<void>((r) => server.close(() => r()));
    await n.stop();
    n = mk();
    await n.start();
    expect(n.status().pending).toEqual({ hook: 4 });
    clock.advance(H);
    await n.tick(); // ECONNREFUSED: retriable, nothing lost
    expect(n.status().pending).toEqual({ hook: 4 });

    // Back up on the same port.
    mode = 'ok';
    server = createServer((q, r) => void handler(q, r));
    await new Promise<void>((r) => server.listen(port, '127.0.0.1', r));
    clock.advance(H);
    await n.tick();
    expect(n.status().pending).toEqual({ hook: 0 });
    expect(got).toHaveLength(2); // stale x3 grouped, low_oxygen alone
    const ids = got.flatMap((g) =>
      (JSON.parse(g.body) as { alerts: { id: string }[] }).alerts.map((a) => a.id),
    );
    expect(ids.sort()).toEqual(sent.map((a) => a.id).sort());
    for (const g of got) expect(g.sig).toBe(`v1=${webhookSignature('s3cret', g.ts!, g.body)}`);
    expect(JSON.parse(got[0]!.body)).toMatchObject({
      kind: 'alerts',
      count: 3,
      subject: 'reefd demo-reef: stale raised x3 (crest)',
    });

    // A second restart re-sends nothing: the deliveries are journaled.
    await n.stop();
    n = mk();
    await n.start();
    clock.advance(H);
    await n.tick();
    expect(got).toHaveLength(2);
    await n.stop();
  });
});

describe('grouping, digest, rate limit', () => {
  const setup = async (
    o: { digestThreshold?: number; rateLimit?: { maxMessages: number; perMs: number } } = {},
  ) => {
    const dir = await tempDir();
    const clock = manualClock();
    const seen: NotificationMessage[] = [];
    const n = createNotifier({
      dir,
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      channels: [createDashboardChannel('ui', (m) => seen.push(m))],
      ...o,
    });
    await n.start();
    cleanups.push(() => n.stop());
    return { n, clock, seen };
  };

  it('sends one message for ten sensors going stale at once, after the group window', async () => {
    const { n, clock, seen } = await setup();
    for (let i = 0; i < 10; i++)
      await n.enqueue(
        alert({ rule: 'stale', fault: 'stale', station: i < 5 ? 'crest' : 'back', sensor: `c${i}` }),
      );
    clock.advance(29 * S);
    await n.tick();
    expect(seen).toEqual([]); // still inside the 30-s window
    clock.advance(2 * S);
    await n.tick();
    expect(seen).toHaveLength(1);
    expect(seen[0]!.alerts).toHaveLength(10);
    expect(seen[0]!.subject).toBe('reefd demo-reef: stale raised x10 (back, crest)');
  });

  it('rate-limits a channel without dropping, and folds a long queue into one digest', async () => {
    const { n, clock, seen } = await setup({ digestThreshold: 5, rateLimit: { maxMessages: 2, perMs: H } });
    for (const r of ['r1', 'r2', 'r3', 'r4']) await n.enqueue(alert({ rule: r, station: 'crest' }));
    clock.advance(31 * S);
    await n.tick();
    expect(seen.map((m) => m.alerts[0]!.rule)).toEqual(['r1', 'r2']); // 2 tokens
    expect(n.status().pending).toEqual({ ui: 2 });
    clock.advance(10 * 60 * S);
    await n.tick();
    expect(seen).toHaveLength(2); // 1/3 of a token
    for (const r of ['r5', 'r6', 'r7']) await n.enqueue(alert({ rule: r, station: 'back' }));
    clock.advance(20 * 60 * S); // one token back; 5 queued = digest threshold
    await n.tick();
    expect(seen).toHaveLength(3);
    expect(seen[2]!.kind).toBe('digest');
    expect(seen[2]!.alerts.map((a) => a.rule)).toEqual(['r3', 'r4', 'r5', 'r6', 'r7']);
    expect(seen[2]!.subject).toMatch(/digest of 5 alert messages/);
    expect(n.status().pending).toEqual({ ui: 0 });
  });

  it('never holds a critical alert back for the rate limit', async () => {
    const { n, clock, seen } = await setup({ rateLimit: { maxMessages: 1, perMs: H } });
    await n.enqueue(alert({ rule: 'spike', station: 'crest', severity: 'info' }));
    await n.enqueue(alert({ rule: 'range', station: 'crest', severity: 'warning' }));
    await n.enqueue(alert({ rule: 'low_oxygen', station: 'back', severity: 'critical' }));
    clock.advance(31 * S);
    await n.tick();
    expect(seen.map((m) => m.alerts[0]!.rule)).toEqual(['spike', 'low_oxygen']); // range waits for a token
    expect(n.status().pending).toEqual({ ui: 1 });
  });

  it('honours a channel minimum severity', async () => {
    const dir = await tempDir();
    const clock = manualClock();
    const pager: NotificationMessage[] = [];
    const n = createNotifier({
      dir,
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      channels: [{ ...createDashboardChannel('pager', (m) => pager.push(m)), minSeverity: 'critical' }],
    });
    await n.start();
    cleanups.push(() => n.stop());
    await n.enqueue(alert({ rule: 'spike', station: 'crest', severity: 'info' }));
    await n.enqueue(alert({ rule: 'low_oxygen', station: 'crest', severity: 'critical' }));
    clock.advance(31 * S);
    await n.tick();
    expect(pager.flatMap((m) => m.alerts.map((a) => a.rule))).toEqual(['low_oxygen']);
  });
});

describe('re-notification and acknowledgement', () => {
  it('reminds quietly every interval until acknowledged, and the ack survives a restart', async () => {
    const dir = await tempDir();
    const clock = manualClock();
    const seen: NotificationMessage[] = [];
    const mk = () =>
      createNotifier({
        dir,
        site: 'demo-reef',
        clock,
        timers: idleTimers,
        renotifyMs: 2 * H,
        channels: [createDashboardChannel('ui', (m) => seen.push(m))],
      });
    let n = mk();
    await n.start();
    const a = alert({ rule: 'low_oxygen', station: 'crest', severity: 'critical' });
    await n.enqueue(a);
    clock.advance(31 * S);
    await n.tick();
    clock.advance(H);
    await n.tick();
    expect(seen.map((m) => m.kind)).toEqual(['alerts']); // 1 h: no reminder yet
    clock.advance(H);
    await n.tick(); // queues the reminder
    clock.advance(31 * S);
    await n.tick();
    expect(seen.map((m) => m.kind)).toEqual(['alerts', 'reminder']);
    expect(seen[1]!.text).toContain(`low_oxygen still raised at crest`);

    expect(await n.ack('nope', 'ana')).toMatchObject({ ok: false, code: 'REEFD_NOTIFY_UNKNOWN_ALERT' });
    expect(await n.ack(a.id, 'ana')).toEqual({ ok: true, id: a.id, by: 'ana', already: false });
    expect(await n.ack(a.id, 'ben')).toEqual({ ok: true, id: a.id, by: 'ana', already: true });
    await n.stop();
    n = mk();
    await n.start();
    clock.advance(10 * H);
    await n.tick();
    clock.advance(31 * S);
    await n.tick();
    expect(seen).toHaveLength(2);
    expect(n.status().episodes[0]!.ack).toEqual({ by: 'ana', atMs: expect.any(Number) });
    // The clear is still delivered after the ack.
    await n.enqueue({ ...a, state: 'cleared', t: new Date(clock.ms).toISOString() });
    clock.advance(31 * S);
    await n.tick();
    expect(seen.map((m) => m.alerts[0]!.state)).toEqual(['raised', 'raised', 'cleared']);
    await n.stop();
  });

  it('stops reminding once cleared', async () => {
    const dir = await tempDir();
    const clock = manualClock();
    const seen: NotificationMessage[] = [];
    const n = createNotifier({
      dir,
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      renotifyMs: H,
      channels: [createDashboardChannel('ui', (m) => seen.push(m))],
    });
    await n.start();
    cleanups.push(() => n.stop());
    const a = alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: 'ctd' });
    await n.enqueue(a);
    await n.enqueue({ ...a, state: 'cleared' });
    for (let i = 0; i < 5; i++) {
      clock.advance(H);
      await n.tick();
    }
    // The raise and the clear (two groups of one pass), then no reminder in 5 h.
    expect(seen.map((m) => [m.kind, m.alerts[0]!.state])).toEqual([
      ['alerts', 'raised'],
      ['alerts', 'cleared'],
    ]);
  });
});

describe('records from other producers', () => {
  it('delivers an alert without station, severity or id (the daemon operational alerts)', async () => {
    const clock = manualClock();
    const seen: NotificationMessage[] = [];
    const n = createNotifier({
      dir: await tempDir(),
      site: 'demo-reef',
      clock,
      timers: idleTimers,
      channels: [{ ...createDashboardChannel('ui', (m) => seen.push(m)), minSeverity: 'warning' }],
    });
    await n.start();
    cleanups.push(() => n.stop());
    const bare = {
      type: 'alert',
      site: 'demo-reef',
      t: new Date(clock.ms).toISOString(),
      rule: 'reefd.disk_full',
      class: 'fault',
      state: 'raised',
      value: 0,
      limit: 0,
    };
    await n.enqueue(bare as never);
    clock.advance(31 * S);
    await n.tick();
    expect(seen).toHaveLength(1);
    expect(seen[0]!.subject).toBe('reefd demo-reef: reefd.disk_full raised at demo-reef');
    expect(seen[0]!.alerts[0]).toMatchObject({
      severity: 'warning',
      id: expect.stringMatching(/^[0-9a-f]{8}$/),
    });
  });
});
