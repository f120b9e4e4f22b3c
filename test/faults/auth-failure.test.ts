// Fault (i): the database refuses reefd's token (rotated on the server, HTTP 401) for a long stretch, and
// reefd is killed with -9 in the middle of it. Records go to the disk spool instead of being dropped, an
// operational alert (`reefd.output_auth`) is queued for notification, and once the token is accepted again
// every record arrives once (VictoriaMetrics without deduplication, every copy counted) and the alert is
// cleared. The NDJSON output beside it holds every record once.
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, countVm, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig, type DaemonChild } from './helpers/daemon.js';
import { countNdjson, verdict } from './helpers/outputs.js';
import { startControlledVm, startCountingProxy, startPrivateMosquitto } from './helpers/procs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const env = caseEnv('i');
afterAll(() => env.cleanup());

/** Alert records queued in the notifier's outbox for one rule, with their state. */
async function queuedAlerts(dataDir: string, rule: string): Promise<string[]> {
  const text = await readFile(join(dataDir, 'alerts', 'outbox.jsonl'), 'utf8').catch(() => '');
  const states: string[] = [];
  for (const line of text.split('\n')) {
    if (!line.includes(rule)) continue;
    const r = JSON.parse(line) as { op?: string; alert?: { rule?: string; state?: string } };
    if (r.op === 'enq' && r.alert?.rule === rule && r.alert.state !== undefined) states.push(r.alert.state);
  }
  return states;
}

describe('fault i: the database refuses the credentials', () => {
  it('spools, alerts, survives a kill -9, and delivers everything once when the token works again', async () => {
    const [mosq, vm] = await Promise.all([startPrivateMosquitto(), startControlledVm({ dedup: false })]);
    env.defer(() => mosq.stop());
    env.defer(() => vm.stop());
    const proxy = await startCountingProxy(vm.url);
    env.defer(() => proxy.close());
    const { prefix, site, dataDir, archiveDir } = env;
    const ndjson = join(dataDir, 'records.ndjson');
    const cfg = writeConfig(
      faultConfig({ prefix, site, dataDir, mqttUrl: mosq.url, influxUrl: proxy.url, ndjsonPath: ndjson }),
    );
    let d: DaemonChild = await spawnDaemon(cfg);
    env.defer(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 1500 });
    const oxygenTs = msgs.filter((m) => m.kind === 'oxygen').map((m) => m.tMs);

    await pub.publish(msgs.slice(0, 100));
    await waitFor(async () => (proxy.lines.get('oxygen') ?? 0) > 0, 10_000);
    proxy.setStatus(401);
    const published = pub.publish(msgs.slice(100), 200, undefined, 100);
    const logged = await waitFor(async () => d.stderr().includes('REEFD_SINK_AUTH'), 15_000);
    const raised = await waitFor(
      async () => (await queuedAlerts(dataDir, 'reefd.output_auth')).includes('raised'),
      10_000,
    );
    const spooled = await waitFor(async () => (await d.metric('reefd_spool_bytes')) > 0, 10_000);
    await sleep(2000);
    const killedAt = pub.acked.size;
    await d.kill('SIGKILL');
    d = await spawnDaemon(cfg);
    await published;
    await sleep(2000);
    const inDbWhileRefused = proxy.lines.get('oxygen') ?? 0;
    proxy.setStatus(undefined);
    const back = await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenTs.length,
      60_000,
      500,
    );
    const cleared = await waitFor(
      async () => (await queuedAlerts(dataDir, 'reefd.output_auth')).includes('cleared'),
      10_000,
    );
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const dbLost = oxygenTs.filter((t) => !db.byTs.has(t)).length;
    const nd = verdict(oxygenTs, await countNdjson(ndjson));
    summary('i (database refuses the token, kill -9 meanwhile)', {
      sent: pub.sent,
      acked: pub.acked.size,
      'killed after acks': killedAt,
      archived: a.byKey.size,
      'requests refused (401)': proxy.refused(),
      'oxygen in db while refused': inDbWhileRefused,
      'auth logged': logged ? 'yes' : 'no',
      'alert raised, cleared': `${raised ? 'yes' : 'no'}, ${cleared ? 'yes' : 'no'}`,
      'oxygen expected': oxygenTs.length,
      'db lost': dbLost,
      'db duplicated': db.duplicates,
      'oxygen points on the wire': proxy.lines.get('oxygen') ?? 0,
      'ndjson lost': nd.lost,
      'ndjson duplicated': nd.duplicated,
      'delivered after return': back ? 'yes' : 'timeout',
    });
    expect(stopped.code).toBe(0);
    expect(pub.acked.size).toBe(msgs.length);
    expect(a.byKey.size).toBe(msgs.length);
    expect(logged).toBe(true);
    expect(spooled).toBe(true);
    expect(raised).toBe(true);
    expect(cleared).toBe(true);
    expect(proxy.refused()).toBeGreaterThan(0);
    expect(inDbWhileRefused).toBeLessThan(oxygenTs.length);
    expect(dbLost).toBe(0);
    expect(db.duplicates).toBe(0);
    expect(proxy.lines.get('oxygen')).toBe(oxygenTs.length);
    expect(nd).toEqual({ lost: 0, duplicated: 0 });
  });
});
