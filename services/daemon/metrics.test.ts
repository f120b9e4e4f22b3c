// The state gauges of /metrics: build info, sources connected, sensors' last-seen age, active alerts. The
// sensors are those a real processor has seen; the alerts are the daemon's own alert records.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type SensorMessage } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import { ActiveAlerts, createMetrics, type DaemonMetrics, type MetricsProbes } from './metrics.js';
import { operationalAlert } from './operational.js';

const parsed = parseConfigText(`
site: test-reef
reef_axis_deg: 270
stations:
  crest: { sensors: { ctd: { kind: ctd }, o2: { kind: oxygen } } }
  mast: { sensors: { met: { kind: met } } }
`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;
const T0 = Date.UTC(2026, 2, 1, 0, 0, 0);

function msg(topic: string, body: Record<string, unknown>): SensorMessage {
  const r = parseMessage(`reef/test-reef/${topic}`, JSON.stringify({ v: 1, ...body }));
  if (!r.ok) throw new Error(`${topic}: ${r.reason}`);
  return r.message;
}

/** Series of one metric as label set -> value, read the way a scrape reads them. */
async function series(m: DaemonMetrics, name: string): Promise<Map<string, number>> {
  const all = await m.registry.getMetricsAsJSON();
  const one = all.find((x) => x.name === name);
  if (one === undefined) throw new Error(`no metric ${name}`);
  return new Map(
    one.values.map((v) => [
      Object.entries(v.labels)
        .map(([k, x]) => `${k}=${String(x)}`)
        .sort()
        .join(','),
      v.value,
    ]),
  );
}

const NONE: MetricsProbes = { nowMs: () => 0, sources: () => [], sensors: () => [], activeAlerts: () => [] };

describe('daemon metrics', () => {
  it('reefd_build_info names the package version and the Node.js version, value 1', async () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as {
      version: string;
    };
    const m = createMetrics(false);
    expect(await series(m, 'reefd_build_info')).toEqual(
      new Map([[`node=${process.version},version=${pkg.version}`, 1]]),
    );
    const text = await m.registry.metrics();
    expect(text).toContain(`reefd_build_info{version="${pkg.version}",node="${process.version}"} 1`);
  });

  it('reefd_source_connected is 1 or 0 per source as it is at the scrape', async () => {
    const m = createMetrics(false);
    expect((await series(m, 'reefd_source_connected')).size).toBe(0);
    let mqttUp = true;
    const sources = [
      { name: 'mqtt', connected: () => mqttUp },
      { name: 'kafka', connected: () => false },
    ];
    m.observe({ ...NONE, sources: () => sources });
    expect(await series(m, 'reefd_source_connected')).toEqual(
      new Map([
        ['source=mqtt', 1],
        ['source=kafka', 0],
      ]),
    );
    mqttUp = false;
    expect((await series(m, 'reefd_source_connected')).get('source=mqtt')).toBe(0);
    sources.pop();
    expect([...(await series(m, 'reefd_source_connected')).keys()]).toEqual(['source=mqtt']);
    m.observe(undefined);
    expect((await series(m, 'reefd_source_connected')).size).toBe(0);
  });

  it('reefd_sensor_last_seen_age_seconds is the wall clock minus the last message time, per sensor', async () => {
    const p = createProcessor(config);
    p.push(msg('crest/ctd/ctd', { t: new Date(T0).toISOString(), temp_c: 27, sal: 35 }), T0 + 200);
    p.push(
      msg('crest/ctd/ctd', { t: new Date(T0 + 60_000).toISOString(), temp_c: 27, sal: 35 }),
      T0 + 60_100,
    );
    p.push(
      msg('mast/met/met', { t: new Date(T0 + 30_000).toISOString(), baro_hpa: 1010, wind_m_s: 4 }),
      T0 + 30_500,
    );
    let now = T0 + 90_000;
    const m = createMetrics(false);
    m.observe({ ...NONE, nowMs: () => now, sensors: () => p.sensorHealth() });
    expect(await series(m, 'reefd_sensor_last_seen_age_seconds')).toEqual(
      new Map([
        ['kind=ctd,sensor=ctd,station=crest', 30],
        ['kind=met,sensor=met,station=mast', 60],
      ]),
    );
    now += 15_500;
    expect(
      (await series(m, 'reefd_sensor_last_seen_age_seconds')).get('kind=ctd,sensor=ctd,station=crest'),
    ).toBe(45.5);
  });

  it('reefd_alerts_active counts the alerts raised and not cleared, by rule and severity', async () => {
    const alerts = new ActiveAlerts();
    const m = createMetrics(false);
    m.observe({ ...NONE, activeAlerts: () => alerts.list() });
    const site = 'test-reef';
    const raisedAt = T0;
    alerts.seed([
      operationalAlert({ site, rule: 'sensor_reboot', value: 1, limit: null, sensor: 'crest/o2', nowMs: T0 }),
    ]);
    alerts.observe([
      operationalAlert({
        site,
        rule: 'output_auth',
        value: null,
        limit: null,
        sensor: 'influx',
        nowMs: raisedAt,
      }),
      operationalAlert({
        site,
        rule: 'output_auth',
        value: null,
        limit: null,
        sensor: 'kafka',
        nowMs: raisedAt,
      }),
    ]);
    expect(await series(m, 'reefd_alerts_active')).toEqual(
      new Map([
        ['rule=reefd.sensor_reboot,severity=warning', 1],
        ['rule=reefd.output_auth,severity=critical', 2],
      ]),
    );
    const clear = operationalAlert({
      site,
      rule: 'output_auth',
      state: 'cleared',
      value: null,
      limit: null,
      sensor: 'influx',
      nowMs: raisedAt + 60_000,
      raisedAtMs: raisedAt,
    });
    alerts.observe([clear]);
    expect((await series(m, 'reefd_alerts_active')).get('rule=reefd.output_auth,severity=critical')).toBe(1);
    // A raise that arrives after its own clear (delivered out of order) is not counted again.
    alerts.observe([
      operationalAlert({
        site,
        rule: 'output_auth',
        value: null,
        limit: null,
        sensor: 'influx',
        nowMs: raisedAt,
      }),
    ]);
    expect((await series(m, 'reefd_alerts_active')).get('rule=reefd.output_auth,severity=critical')).toBe(1);
    // Records of other types pass by.
    alerts.observe([{ type: 'oxygen', site, t: new Date(T0).toISOString() } as never]);
    expect(alerts.list()).toHaveLength(2);
  });
});
