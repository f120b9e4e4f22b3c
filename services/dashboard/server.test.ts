import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord } from '../../libs/contract/index.js';
import { RecordHistory } from './history.js';
import { createDashboardServer, type DashboardServer } from './server.js';

const r = parseConfigText(
  readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
);
if (!r.ok) throw new Error('demo config invalid');
const config = r.config;
const quiet = { info() {}, warn() {}, error() {}, debug() {} };
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();
const oxygen = (tMs: number, mgL: number): DerivedRecord => ({
  type: 'oxygen',
  site: 'ornen-reef',
  t: iso(tMs),
  station: 'lagoon',
  o2_umol_kg: mgL * 30.6,
  o2_sat_pct: null,
  o2_mg_l: mgL,
});
const alert = (tMs: number, state: 'raised' | 'cleared'): DerivedRecord =>
  ({
    type: 'alert',
    site: 'ornen-reef',
    t: iso(tMs),
    station: 'lagoon',
    rule: 'low_oxygen',
    class: 'threshold',
    state,
    value: 1.8,
    limit: 2,
    metric: 'oxygen.o2_mg_l',
    id: 'a1b2c3d4',
  }) as DerivedRecord;

const servers: DashboardServer[] = [];
afterEach(async () => {
  for (const s of servers.splice(0)) await s.close();
});
async function start(extra: Partial<Parameters<typeof createDashboardServer>[0]> = {}) {
  const s = await createDashboardServer({ config, port: 0, logger: quiet, ...extra });
  servers.push(s);
  return s;
}

describe('RecordHistory', () => {
  it('keeps 48 h per series, bounded, sorted, and the latest alert state per id', () => {
    const h = new RecordHistory({ maxPerSeries: 100 });
    const recs = Array.from({ length: 300 }, (_, i) => oxygen(T0 + i * 20 * 60_000, 5));
    h.add([...recs].reverse());
    expect(h.size).toBe(100);
    const kept = h.records();
    expect(Date.parse(kept[0]!.t)).toBe(T0 + 200 * 20 * 60_000);
    expect(Date.parse(kept.at(-1)!.t)).toBe(T0 + 299 * 20 * 60_000);
    const wide = new RecordHistory();
    wide.add([oxygen(T0, 5), oxygen(T0 + 49 * 3.6e6, 5)]);
    expect(wide.size).toBe(1); // the first is older than 48 h before the newest
    wide.add([alert(T0 + 49 * 3.6e6, 'raised'), alert(T0 + 50 * 3.6e6, 'cleared')]);
    expect(wide.alerts().map((a) => a.record.state)).toEqual(['cleared']);
  });
});

describe('createDashboardServer', () => {
  it('binds 127.0.0.1 and moves to the next free port when its port is taken', async () => {
    const blocker = createServer();
    await new Promise<void>((res) => blocker.listen(0, '127.0.0.1', () => res()));
    const taken = (blocker.address() as AddressInfo).port;
    try {
      const s = await start({ port: taken, portAttempts: 3 });
      expect(s.port).not.toBe(taken);
      expect(s.url).toBe(`http://127.0.0.1:${s.port}`);
      expect((await fetch(`${s.url}/healthz`)).status).toBe(200);
    } finally {
      blocker.close();
    }
  });

  it('guards every route but /healthz with the token, by header or query, and sends no CORS headers', async () => {
    const s = await start({ token: 's3cret-token' });
    expect((await fetch(`${s.url}/healthz`)).status).toBe(200);
    expect((await fetch(`${s.url}/api/site`)).status).toBe(401);
    expect((await fetch(`${s.url}/api/site?token=wrong`)).status).toBe(401);
    const ok = await fetch(`${s.url}/api/site`, { headers: { authorization: 'Bearer s3cret-token' } });
    expect(ok.status).toBe(200);
    expect(ok.headers.get('access-control-allow-origin')).toBeNull();
    expect(((await ok.json()) as { stations: unknown[] }).stations.length).toBe(7);
    expect((await fetch(`${s.url}/?token=s3cret-token`)).status).toBe(200);
  });

  it('answers /readyz from the callback and /metrics from the metrics text', async () => {
    let ready = false;
    const s = await start({ ready: () => ready, metrics: () => 'reefd_messages_total 3\n' });
    expect((await fetch(`${s.url}/readyz`)).status).toBe(503);
    ready = true;
    expect((await fetch(`${s.url}/readyz`)).status).toBe(200);
    expect(await (await fetch(`${s.url}/metrics`)).text()).toBe('reefd_messages_total 3\n');
  });

  it('serves the seeded history and streams published records over SSE', async () => {
    const s = await start({ history: [oxygen(T0, 5)] });
    const res = await fetch(`${s.url}/api/records`);
    expect(((await res.json()) as { records: unknown[] }).records.length).toBe(1);
    const ctrl = new AbortController();
    const ev = await fetch(`${s.url}/api/events`, { signal: ctrl.signal });
    expect(ev.headers.get('content-type')).toContain('text/event-stream');
    const reader = ev.body!.getReader();
    s.publish([oxygen(T0 + 600_000, 1.9)]);
    let text = '';
    while (!text.includes('event: records')) text += new TextDecoder().decode((await reader.read()).value);
    while (!text.includes('\n\n', text.indexOf('event: records')))
      text += new TextDecoder().decode((await reader.read()).value);
    expect(text).toContain('"o2_mg_l":1.9');
    ctrl.abort();
  });

  it('acknowledges a known alert through onAck and refuses cross-site or non-JSON posts', async () => {
    const acks: string[] = [];
    const s = await start({
      history: [alert(T0, 'raised')],
      onAck: (id, by) => void acks.push(`${id}:${by}`),
    });
    const post = (body: string, headers: Record<string, string>) =>
      fetch(`${s.url}/api/alerts/a1b2c3d4/ack`, { method: 'POST', body, headers });
    expect((await post('by=x', { 'content-type': 'application/x-www-form-urlencoded' })).status).toBe(415);
    expect(
      (await post('{}', { 'content-type': 'application/json', origin: 'http://evil.example' })).status,
    ).toBe(403);
    expect(
      (
        await fetch(`${s.url}/api/alerts/ffffffff/ack`, {
          method: 'POST',
          body: '{}',
          headers: { 'content-type': 'application/json' },
        })
      ).status,
    ).toBe(404);
    const ok = await post('{"by":"Mika"}', { 'content-type': 'application/json' });
    expect(ok.status).toBe(200);
    expect(acks).toEqual(['a1b2c3d4:Mika']);
    const list = (await (await fetch(`${s.url}/api/alerts`)).json()) as {
      alerts: { id: string; ack: { by: string } | null }[];
    };
    expect(list.alerts[0]).toMatchObject({ id: 'a1b2c3d4', ack: { by: 'Mika' } });
  });

  it('serves uPlot from node_modules and our static files, with a restrictive CSP', async () => {
    const s = await start();
    const js = await fetch(`${s.url}/vendor/uplot.min.js`);
    expect(js.status).toBe(200);
    expect(await js.text()).toContain('uPlot');
    expect((await fetch(`${s.url}/vendor/uplot.min.css`)).status).toBe(200);
    const index = await fetch(`${s.url}/`);
    expect(index.headers.get('content-security-policy')).toContain("default-src 'self'");
    expect(await index.text()).toContain('/app.js');
    expect((await fetch(`${s.url}/../package.json`)).status).toBe(404);
  });
});
