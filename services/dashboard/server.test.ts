import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord, type ReefdConfig } from '../../libs/contract/index.js';
import { alertsStateDir, createDashboardChannel, createNotifier, type Notifier } from '../notifiers/index.js';
import { idleTimers, manualClock } from '../notifiers/test-helpers.js';
import type { AlertView, SensorsBody, SiteInfo } from './api-schemas.js';
import { demoSiteConfig, runDemo, type DemoRun } from './demo-records.js';
import type { RecordQuery } from './record-query.js';
import { checkSchema } from './testing.js';
import { createDashboardServer, type DashboardOptions, type DashboardServer } from './server.js';

const config = demoSiteConfig();
const quiet = { info() {}, warn() {}, error() {}, debug() {} };
const H = 3_600_000;
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();

const servers: DashboardServer[] = [];
const notifiers: Notifier[] = [];
afterEach(async () => {
  for (const s of servers.splice(0)) await s.close();
  for (const n of notifiers.splice(0)) await n.stop();
});
async function start(extra: Partial<DashboardOptions> = {}) {
  const s = await createDashboardServer({ config, port: 0, logger: quiet, ...extra });
  servers.push(s);
  return s;
}
async function notifier(data: string) {
  const n = createNotifier({
    dir: alertsStateDir(data),
    site: config.site,
    clock: manualClock(),
    timers: idleTimers,
    channels: [createDashboardChannel('ui', () => undefined)],
  });
  await n.start();
  notifiers.push(n);
  return n;
}
const get = async <T>(url: string): Promise<T> => {
  const r = await fetch(url);
  expect(r.status, url).toBe(200);
  return (await r.json()) as T;
};

let demo: DemoRun;
let records: DerivedRecord[];
beforeAll(() => {
  // Eight hours of the fictional reef through the real processor: the lagoon CTD goes silent and comes back.
  demo = runDemo({ startMs: T0, hours: 8, seed: 8 });
  records = demo.batches.flatMap((b) => b.records);
}, 60_000);

/** Records of the kinds the processor does not emit yet (light soon; daily and forecast later), constructed. */
function phaseTwoRecords(): DerivedRecord[] {
  return [
    {
      type: 'light',
      site: config.site,
      t: iso(T0 + H),
      station: 'flat',
      sensor: 'par-flat',
      par_umol_m2_s: 0,
      flag: 1,
    },
    {
      type: 'daily',
      site: config.site,
      t: iso(T0 - 14 * H),
      transect: 'inner',
      day: '2026-02-28',
      ncp_mmol_m2_d: 12,
      ncp_mmol_m2_d_sigma: 8,
      r_mmol_m2_d: 140,
      r_mmol_m2_d_sigma: 10,
      gpp_mmol_m2_d: 152,
      gpp_mmol_m2_d_sigma: 12,
      nec_mmol_m2_d: 60,
      nec_mmol_m2_d_sigma: 20,
      nec_day_mmol_m2_d: 50,
      nec_day_mmol_m2_d_sigma: 15,
      nec_night_mmol_m2_d: 10,
      nec_night_mmol_m2_d_sigma: 12,
      coverage: 0.82,
      gap_filled: 0.1,
      pmax_mmol_m2_h: 30,
      ik_umol_m2_s: 410,
      valid: true,
    },
    {
      type: 'forecast',
      site: config.site,
      t: iso(T0 + 5 * H),
      station: 'lagoon',
      o2_min_mg_l: 1.6,
      o2_min_lo_mg_l: 1.2,
      o2_min_hi_mg_l: 2.1,
      t_min: iso(T0 + 13 * H),
      horizon_h: 8,
    },
  ] as DerivedRecord[];
}

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
    expect((await fetch(`${s.url}/openapi.json`)).status).toBe(401);
    expect((await fetch(`${s.url}/api/site?token=wrong`)).status).toBe(401);
    const ok = await fetch(`${s.url}/api/site`, { headers: { authorization: 'Bearer s3cret-token' } });
    expect(ok.status).toBe(200);
    expect(ok.headers.get('access-control-allow-origin')).toBeNull();
    expect(((await ok.json()) as SiteInfo).stations.length).toBe(7);
    expect((await fetch(`${s.url}/?token=s3cret-token`)).status).toBe(200);
  });

  it('serves the site with the rules in force, the time zone and every field unit', async () => {
    const text = `${(await import('node:fs')).readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8')}
alerts:
  low_oxygen: { below: 3.0, clear: 3.5 }
  rules:
    warm_water: { metric: ctd.temp_c, above: 30.5, stations: [lagoon] }
`;
    const r = parseConfigText(text);
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    const s = await start({ config: r.config as ReefdConfig });
    const site = await get<SiteInfo>(`${s.url}/api/site`);
    expect(site.timezone).toBe('Pacific/Tahiti');
    const low = site.rules.find((x) => x.id === 'low_oxygen')!;
    expect(low).toMatchObject({
      metric: 'oxygen.o2_mg_l',
      dir: 'below',
      limit: 3,
      clear: 3.5,
      unit: 'mg L-1',
    });
    expect(site.rules.find((x) => x.id === 'warm_water')).toMatchObject({
      dir: 'above',
      limit: 30.5,
      unit: 'degree_Celsius',
      stations: ['lagoon'],
    });
    expect(site.rules.find((x) => x.id === 'battery' && x.metric === 'pco2.battery_v')?.limit).toBe(11.5);
    expect(site.record_types.oxygen?.fields.o2_mg_l).toEqual({
      unit: 'mg L-1',
      label: 'dissolved oxygen',
      kind: 'number',
    });
    expect(site.record_types.carbonate?.fields.sal?.unit).toBe('1');
    expect(site.history).toEqual({ window_h: 48, resolution_min: 10 });
  });

  it('answers /api/records from the store it is given, with a default range and checked parameters', async () => {
    const calls: Parameters<RecordQuery['query']>[] = [];
    // A test double of the durable store: the HTTP side's contract is what it asks and how it pages.
    const store: RecordQuery = {
      source: 'test-store',
      async query(f, page) {
        calls.push([f, page]);
        return page.cursor === undefined
          ? { records: records.slice(0, 2), next: 'page2' }
          : { records: records.slice(2, 3) };
      },
      async latestMs() {
        return T0 + 10 * H;
      },
    };
    const s = await start({ query: store });
    const first = await get<{
      source: string;
      from: string;
      to: string;
      records: unknown[];
      next_cursor: string | null;
    }>(`${s.url}/api/records?type=oxygen,carbonate&station=lagoon&limit=2`);
    expect(first).toMatchObject({
      source: 'test-store',
      next_cursor: 'page2',
      from: iso(T0 - 38 * H + 1),
      to: iso(T0 + 10 * H + 1),
    });
    expect(first.records).toHaveLength(2);
    const second = await get<{ next_cursor: string | null }>(
      `${s.url}/api/records?from=2026-02-01T00:00:00Z&to=2026-03-01T00:00:00Z&cursor=page2`,
    );
    expect(second.next_cursor).toBeNull();
    expect(calls[0]![0]).toEqual({
      types: ['oxygen', 'carbonate'],
      station: 'lagoon',
      fromMs: T0 - 38 * H + 1,
      toMs: T0 + 10 * H + 1,
    });
    expect(calls[0]![1]).toEqual({ limit: 2 });
    expect(calls[1]![0]).toEqual({ fromMs: Date.UTC(2026, 1, 1), toMs: T0 });
    for (const bad of [
      'type=salt',
      'from=yesterday',
      'from=2026-03-02T00:00:00Z&to=2026-03-01T00:00:00Z',
      'limit=0',
      'colour=red',
    ]) {
      const r = await fetch(`${s.url}/api/records?${bad}`);
      expect(r.status, bad).toBe(400);
      expect(((await r.json()) as { error: string }).error).toBe('REEFD_DASHBOARD_BAD_QUERY');
    }
  });

  it('streams records and alert changes over SSE, including an acknowledgement made by the CLI', async () => {
    const data = await mkdtemp(path.join(tmpdir(), 'reefd-dash-'));
    const n = await notifier(data);
    const subs: ((r: readonly DerivedRecord[]) => void)[] = [];
    const s = await start({
      acks: n,
      subscribe: (fn) => {
        subs.push(fn);
        return () => void subs.splice(subs.indexOf(fn), 1);
      },
    });
    expect(subs).toHaveLength(1);
    const ctrl = new AbortController();
    const ev = await fetch(`${s.url}/api/events`, { signal: ctrl.signal });
    expect(ev.headers.get('content-type')).toContain('text/event-stream');
    const reader = ev.body!.getReader();
    let text = '';
    const until = async (needle: string) => {
      while (!text.includes(needle)) text += new TextDecoder().decode((await reader.read()).value);
    };
    const stale = records.find((r) => r.type === 'alert' && r.state === 'raised') as DerivedRecord & {
      id: string;
    };
    await n.enqueue(stale as never);
    subs[0]!(records.slice(0, 50));
    subs[0]!([stale]);
    await until('event: records');
    await until(`"id":"${stale.id}"`);
    const { run } = await import('../cli/commands/alerts.js');
    const out = {
      out: '',
      err: '',
      env: {},
      isTty: false,
      stdout: (t: string) => void (out.out += t),
      stderr: (t: string) => void (out.err += t),
    };
    expect(
      await run(['ack', stale.id, '--data', data, '--by', 'Ana', '--comment', 'diving at 10'], out),
    ).toBe(0);
    await n.syncAcks(); // the daemon's folder watch calls this
    await until('"by":"Ana"');
    const a = (await get<{ alerts: AlertView[] }>(`${s.url}/api/alerts`)).alerts.find(
      (x) => x.id === stale.id,
    );
    expect(a?.ack).toMatchObject({ by: 'Ana', comment: 'diving at 10' });
    ctrl.abort();
    await s.close();
    expect(subs).toHaveLength(0); // unsubscribed on close
  });

  it('acknowledges by name with a comment, and refuses anonymous, cleared, cross-site and non-JSON posts', async () => {
    const data = await mkdtemp(path.join(tmpdir(), 'reefd-dash-'));
    const n = await notifier(data);
    const alerts = records.filter((r) => r.type === 'alert') as (DerivedRecord & {
      id: string;
      state: string;
    })[];
    for (const a of alerts) await n.enqueue(a as never);
    const s = await start({ acks: n, seed: records });
    const raised = alerts.find(
      (a) => a.state === 'raised' && !alerts.some((c) => c.id === a.id && c.state === 'cleared'),
    );
    const cleared = alerts.find((a) => a.state === 'cleared')!;
    expect(raised).toBeDefined();
    const post = (
      id: string,
      body: string,
      headers: Record<string, string> = { 'content-type': 'application/json' },
    ) => fetch(`${s.url}/api/alerts/${id}/ack`, { method: 'POST', body, headers });
    expect(
      (await post(raised!.id, 'by=x', { 'content-type': 'application/x-www-form-urlencoded' })).status,
    ).toBe(415);
    expect(
      (
        await post(raised!.id, '{"by":"Mika"}', {
          'content-type': 'application/json',
          origin: 'http://evil.example',
        })
      ).status,
    ).toBe(403);
    expect((await post('ffffffff', '{"by":"Mika"}')).status).toBe(404);
    const anon = await post(raised!.id, '{}');
    expect(anon.status).toBe(400);
    expect(((await anon.json()) as { error: string }).error).toBe('REEFD_DASHBOARD_ACK_NAME');
    const c = await post(cleared.id, '{"by":"Mika"}');
    expect(c.status).toBe(409);
    expect(((await c.json()) as { error: string }).error).toBe('REEFD_NOTIFY_ALERT_CLEARED');
    const ok = await post(raised!.id, '{"by":"Mika","comment":"checked on the boat"}');
    expect(ok.status).toBe(200);
    expect(((await ok.json()) as { alert: AlertView }).alert).toMatchObject({
      id: raised!.id,
      ack: { by: 'Mika', comment: 'checked on the boat' },
      can_ack: false,
    });
    // The same state from the notifier (what `reefd alerts list` reads).
    expect(n.status().episodes.find((e) => e.id === raised!.id)?.ack).toMatchObject({
      by: 'Mika',
      comment: 'checked on the boat',
    });
    const list = await get<{ alerts: AlertView[] }>(`${s.url}/api/alerts`);
    expect(list.alerts.find((x) => x.id === cleared.id)).toMatchObject({ state: 'cleared', can_ack: false });
  });

  it('keeps its history in a folder and shows it again after a restart', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-dash-'));
    const a = await start({ historyDir: dir });
    a.publish(records);
    const before = await get<{ records: DerivedRecord[] }>(`${a.url}/api/history?type=oxygen&station=lagoon`);
    expect(before.records.length).toBeGreaterThan(40);
    await a.close();
    const b = await start({ historyDir: dir });
    const after = await get<{ records: DerivedRecord[] }>(`${b.url}/api/history?type=oxygen&station=lagoon`);
    expect(after.records).toEqual(before.records);
    // The page asks for the newest of every series first, and a place's series only when it shows it.
    const latest = await get<{ records: DerivedRecord[]; latest: DerivedRecord[] }>(
      `${b.url}/api/history?part=latest`,
    );
    expect(latest.records).toEqual([]);
    expect(latest.latest.find((r) => r.type === 'oxygen' && r.station === 'lagoon')?.t).toBe(
      before.records.at(-1)!.t,
    );
  });

  it('describes every /api endpoint in /openapi.json, and every live answer fits the document', async () => {
    const data = await mkdtemp(path.join(tmpdir(), 'reefd-dash-'));
    const log = path.join(data, 'log.yaml');
    await writeFile(
      log,
      `- { t: 2026-03-01T02:00:00Z, station: lagoon, event: cleaning, text: wiped the optode }\n`,
    );
    const n = await notifier(data);
    for (const a of records.filter((r) => r.type === 'alert')) await n.enqueue(a as never);
    const s = await start({
      config: { ...config, logbook_file: 'log.yaml' },
      baseDir: data,
      acks: n,
      seed: [...records, ...phaseTwoRecords()],
      health: () => demo.processor.sensorHealth(),
      activeAlerts: () => demo.processor.activeAlerts(),
    });
    const doc = await get<
      Record<string, unknown> & {
        paths: Record<
          string,
          Record<string, { responses: Record<string, { content?: Record<string, { schema: object }> }> }>
        >;
      }
    >(`${s.url}/openapi.json`);
    expect(doc.openapi).toBe('3.1.0');
    const documented = Object.keys(doc.paths).sort();
    expect(documented).toEqual([
      '/api/alerts',
      '/api/alerts/{id}/ack',
      '/api/events',
      '/api/fieldlog',
      '/api/history',
      '/api/records',
      '/api/sensors',
      '/api/site',
    ]);
    const live: [string, string][] = [
      ['/api/site', '/api/site'],
      ['/api/history', '/api/history'],
      ['/api/history', '/api/history?station=lagoon&type=oxygen,forecast'],
      ['/api/history', '/api/history?part=latest'],
      ['/api/records', '/api/records?type=flux,daily&limit=20'],
      ['/api/alerts', '/api/alerts'],
      ['/api/sensors', '/api/sensors'],
      ['/api/fieldlog', '/api/fieldlog'],
    ];
    for (const [route, url] of live) {
      const body = await get<unknown>(`${s.url}${url}`);
      const schema = doc.paths[route]!.get!.responses['200']!.content!['application/json']!.schema;
      expect(checkSchema(body, schema as never, doc), url).toEqual([]);
    }
    // The error answers fit the document too, and the checker does catch a wrong answer.
    const bad = await fetch(`${s.url}/api/records?type=salt`);
    const errSchema = doc.paths['/api/records']!.get!.responses['400']!.content!['application/json']!.schema;
    expect(checkSchema(await bad.json(), errSchema as never, doc)).toEqual([]);
    const siteSchema = doc.paths['/api/site']!.get!.responses['200']!.content!['application/json']!.schema;
    expect(checkSchema({ site: 3 }, siteSchema as never, doc).length).toBeGreaterThan(3);
    // POST: an acknowledgement's answer.
    const raised = (await get<{ alerts: AlertView[] }>(`${s.url}/api/alerts`)).alerts.find((a) => a.can_ack)!;
    const ack = await fetch(`${s.url}/api/alerts/${raised.id}/ack`, {
      method: 'POST',
      body: JSON.stringify({ by: 'Mika' }),
      headers: { 'content-type': 'application/json' },
    });
    const ackSchema = (
      doc.paths['/api/alerts/{id}/ack'] as Record<
        string,
        { responses: Record<string, { content: Record<string, { schema: object }> }> }
      >
    ).post!.responses['200']!.content['application/json']!.schema;
    expect(checkSchema(await ack.json(), ackSchema as never, doc)).toEqual([]);
    // The sensor view has every configured sensor, the field log reached the lagoon's sensors.
    const sensors = await get<SensorsBody>(`${s.url}/api/sensors`);
    expect(sensors.sensors).toHaveLength(
      Object.values(config.stations).reduce((k, st) => k + Object.keys(st.sensors).length, 0),
    );
    expect(sensors.sensors.find((x) => x.sensor === 'o2-lagoon')?.logbook.map((e) => e.text)).toEqual([
      'wiped the optode',
    ]);
  }, 30_000);

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
