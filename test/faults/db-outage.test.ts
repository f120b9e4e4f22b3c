// Fault (c): the database down for a long stretch. Records go to the disk spool, the near-bound alert fires
// (REEFD_SPOOL_NEAR_LIMIT) as the spool passes 80 % of spool_max_mb, and when the database returns every
// record arrives, in the order it was produced, once (VictoriaMetrics without deduplication, every copy
// counted). The NDJSON output beside it is untouched by the outage: every record once.
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, countVm, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig } from './helpers/daemon.js';
import { startControlledVm, startCountingProxy, startPrivateMosquitto } from './helpers/procs.js';
import { countNdjson, verdict } from './helpers/outputs.js';
import { caseEnv, nonDecreasing } from './helpers/setup.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const env = caseEnv('c');
afterAll(() => env.cleanup());

// One spooled oxygen entry is about 190 bytes: the 1900 sent while the database is down fill ~84 % of 0.42 MB.
const N = 2000;
const SPOOL_MAX_MB = 0.42;

describe('fault c: database down for a long stretch', () => {
  it('spools, alerts near the bound, replays everything in order', async () => {
    const mosq = await startPrivateMosquitto();
    env.defer(() => mosq.stop());
    const vm = await startControlledVm({ dedup: false });
    env.defer(() => vm.stop());
    const proxy = await startCountingProxy(vm.url);
    env.defer(() => proxy.close());
    const { prefix, site, dataDir, archiveDir } = env;
    const ndjson = join(dataDir, 'records.ndjson');
    const cfg = writeConfig(
      faultConfig({
        prefix,
        site,
        dataDir,
        mqttUrl: mosq.url,
        influxUrl: proxy.url,
        spoolMaxMb: SPOOL_MAX_MB,
        ndjsonPath: ndjson,
      }),
    );
    const d = await spawnDaemon(cfg);
    env.defer(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: N });
    const oxygenTs = msgs.filter((m) => m.kind === 'oxygen').map((m) => m.tMs);

    // A little through the database, then the database process stops for the whole rest of the stream.
    await pub.publish(msgs.slice(0, 100));
    await sleep(1000);
    await vm.down();
    const downAt = Date.now();
    await pub.publish(msgs.slice(100));
    const alerted = await waitFor(async () => d.stderr().includes('REEFD_SPOOL_NEAR_LIMIT'), 10_000);
    await waitFor(async () => (await d.metric('reefd_spool_bytes')) > 0, 6_000);
    const spoolBytes = await d.metric('reefd_spool_bytes');
    const inDbWhileDown = proxy.lines.get('oxygen') ?? 0;
    await sleep(Math.max(0, 12_000 - (Date.now() - downAt)));
    const downMs = Date.now() - downAt;
    await vm.up();
    const upAt = Date.now();
    const back = await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenTs.length,
      40_000,
      500,
    );
    const replayMs = Date.now() - upAt;
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const missingDb = oxygenTs.filter((t) => !db.byTs.has(t)).length;
    const nd = verdict(oxygenTs, await countNdjson(ndjson));
    summary('c (database down)', {
      sent: pub.sent,
      acked: pub.acked.size,
      archived: a.byKey.size,
      'down s': (downMs / 1000).toFixed(1),
      'spool bytes at peak': spoolBytes,
      'spool bound bytes': Math.round(SPOOL_MAX_MB * 1024 * 1024),
      'near-bound alert': alerted ? 'yes' : 'no',
      'oxygen expected': oxygenTs.length,
      'in db': db.byTs.size,
      'db lost': missingDb,
      'db duplicated': db.duplicates,
      'ndjson lost': nd.lost,
      'ndjson duplicated': nd.duplicated,
      'replay s after return': back ? (replayMs / 1000).toFixed(1) : 'timeout',
      'arrival in order': nonDecreasing(proxy.order) ? 'yes' : 'no',
    });
    expect(stopped.code).toBe(0);
    expect(pub.acked.size).toBe(msgs.length);
    expect(a.byKey.size).toBe(msgs.length);
    expect(inDbWhileDown).toBeLessThan(oxygenTs.length);
    expect(alerted).toBe(true);
    expect(spoolBytes).toBeLessThan(SPOOL_MAX_MB * 1024 * 1024);
    expect(missingDb).toBe(0);
    expect(db.duplicates).toBe(0);
    expect(nd).toEqual({ lost: 0, duplicated: 0 });
    expect(proxy.order.length).toBe(oxygenTs.length);
    expect(nonDecreasing(proxy.order)).toBe(true);
  });
});
