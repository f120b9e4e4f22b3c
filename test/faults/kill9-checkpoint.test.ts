// Fault (a, second part): `kill -9` right after a checkpoint while the database is slow (each write held
// 2 s by a proxy), so records of messages the checkpoint covers are still in the sink's memory or in flight
// at the kill. After the restart every oxygen record reaches the database once (VictoriaMetrics without
// deduplication, every copy counted) and the NDJSON output once.
import { statSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, countVm, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig } from './helpers/daemon.js';
import { startControlledVm, startCountingProxy, startPrivateMosquitto } from './helpers/procs.js';
import { countNdjson, verdict } from './helpers/outputs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const env = caseEnv('k');
afterAll(() => env.cleanup());

describe('fault a: kill -9 right after a checkpoint, database slow', () => {
  it('rebuilds the records the checkpoint covered but the database had not taken', async () => {
    const mosq = await startPrivateMosquitto();
    env.defer(() => mosq.stop());
    const vm = await startControlledVm({ dedup: false });
    env.defer(() => vm.stop());
    const proxy = await startCountingProxy(vm.url);
    env.defer(() => proxy.close());
    const { prefix, site, dataDir, archiveDir } = env;
    const ndjson = join(dataDir, 'records.ndjson');
    const cfg = writeConfig(
      faultConfig({ prefix, site, dataDir, mqttUrl: mosq.url, influxUrl: proxy.url, ndjsonPath: ndjson }),
    );
    let d = await spawnDaemon(cfg);
    env.defer(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 2000 });
    const oxygenTs = msgs.filter((m) => m.kind === 'oxygen').map((m) => m.tMs);

    proxy.setDelayMs(2000);
    const published = pub.publish(msgs, 200, undefined, 50);
    // The start writes a checkpoint at once (the stream's epoch); the first periodic one replaces it.
    const cpFile = join(dataDir, 'checkpoint.json');
    const firstMs = statSync(cpFile).mtimeMs;
    const checkpointed = await waitFor(async () => statSync(cpFile).mtimeMs > firstMs, 45_000, 20);
    const killAt = pub.acked.size;
    const inDbAtKill = (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size;
    await d.kill('SIGKILL');
    proxy.setDelayMs(0);
    await sleep(300);
    d = await spawnDaemon(cfg);
    await published;
    await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenTs.length,
      10_000,
      500,
    );
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const lost = oxygenTs.filter((t) => !db.byTs.has(t));
    const nd = verdict(oxygenTs, await countNdjson(ndjson));
    summary('a (kill -9 after a checkpoint, slow database)', {
      sent: pub.sent,
      acked: pub.acked.size,
      'killed after acks': killAt,
      'oxygen in db at the kill': inDbAtKill,
      archived: a.byKey.size,
      'oxygen expected': oxygenTs.length,
      'in db': db.byTs.size,
      'db lost': lost.length,
      'db duplicated': db.duplicates,
      'oxygen points on the wire': proxy.lines.get('oxygen') ?? 0,
      'ndjson lost': nd.lost,
      'ndjson duplicated': nd.duplicated,
      'missing span s': lost.length > 0 ? ((lost.at(-1) as number) - (lost[0] as number)) / 1000 : 0,
    });
    expect(checkpointed).toBe(true);
    expect(stopped.code).toBe(0);
    expect(a.byKey.size).toBe(msgs.length);
    expect(lost.length).toBe(0);
    expect(db.duplicates).toBe(0);
    expect(nd).toEqual({ lost: 0, duplicated: 0 });
  });
});
