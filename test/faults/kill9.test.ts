// Fault (a): `kill -9` of reefd mid-stream, then a restart. With QoS 1 and the persistent session, every
// message the publisher got acknowledged is in the archive and, as an oxygen record, in the database,
// and nothing is there twice.
import { mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { randomSuffix } from '../integration/env.js';
import { countArchive, countVm, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig, type DaemonChild } from './helpers/daemon.js';
import { startControlledVm, startCountingProxy, startPrivateMosquitto } from './helpers/procs.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const cleanups: (() => Promise<unknown>)[] = [];
afterAll(async () => {
  for (const c of cleanups.reverse()) await c().catch(() => undefined);
});

describe('fault a: kill -9 of reefd mid-stream', () => {
  it('loses and duplicates nothing acknowledged (archive and database)', async () => {
    const mosq = await startPrivateMosquitto();
    cleanups.push(() => mosq.stop());
    // The database as a deployment must run it (services/sinks/influx-sink.ts: dedup on, so a point sent
    // again overwrites), behind a proxy that counts how many oxygen points reefd sent in all.
    const vm = await startControlledVm({ dedup: true });
    cleanups.push(() => vm.stop());
    const proxy = await startCountingProxy(vm.url);
    cleanups.push(() => proxy.close());
    const id = randomSuffix();
    const prefix = `fa-${id}`;
    const site = `fa${id}`;
    const dataDir = mkdtempSync(join(tmpdir(), 'reefd-faults-a-'));
    cleanups.push(() => rm(dataDir, { recursive: true, force: true }));
    const cfg = writeConfig(faultConfig({ prefix, site, dataDir, mqttUrl: mosq.url, influxUrl: proxy.url }));

    let d: DaemonChild = await spawnDaemon(cfg);
    cleanups.push(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${id}`);
    cleanups.push(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 2000 });
    const oxygenKeys = msgs.filter((m) => m.kind === 'oxygen').map((m) => m.key);

    // Two kills: one a few seconds in (no checkpoint written yet: the restart starts from an empty
    // processor) and one 33 s after the restart (a checkpoint exists: the restart replays the archive tail).
    const published = pub.publish(msgs, 200, undefined, 50);
    const kills: number[] = [];
    await sleep(4000);
    kills.push(pub.acked.size);
    expect((await d.kill('SIGKILL')).signal).toBe('SIGKILL');
    await sleep(300);
    d = await spawnDaemon(cfg);
    await sleep(33_000);
    kills.push(pub.acked.size);
    expect((await d.kill('SIGKILL')).signal).toBe('SIGKILL');
    await sleep(300);
    d = await spawnDaemon(cfg);
    await published;
    const lostTs = (db: { byTs: Map<number, number> }) =>
      oxygenKeys.map((k) => Number(k.split('/')[2])).filter((t) => !db.byTs.has(t));

    const archiveDir = join(dataDir, 'archive');
    await waitFor(async () => {
      const a = await countArchive(archiveDir, prefix);
      return [...pub.acked].every((k) => a.byKey.has(k));
    }, 10_000);
    await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenKeys.length,
      8_000,
      500,
    );
    const stopped = await d.kill('SIGTERM');
    expect(stopped.code).toBe(0);

    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const missingArchive = [...pub.acked].filter((k) => !a.byKey.has(k)).length;
    const expectedTs = new Set(oxygenKeys.map((k) => Number(k.split('/')[2])));
    const missingDb = [...expectedTs].filter((t) => !db.byTs.has(t)).length;
    summary('a (kill -9)', {
      sent: pub.sent,
      acked: pub.acked.size,
      'killed after acks': kills.join(' and '),
      archived: a.byKey.size,
      'archive lines': a.lines,
      'archive redelivered copies': a.duplicates,
      'archive conflicts': a.conflicts,
      'missing from archive': missingArchive,
      'oxygen expected': expectedTs.size,
      'in db': db.byTs.size,
      'db samples': db.samples,
      'db duplicates': db.duplicates,
      'oxygen points sent (with re-sends)': proxy.lines.get('oxygen') ?? 0,
      'missing from db': missingDb,
    });
    if (missingDb > 0) {
      const lost = lostTs(db);
      console.log(
        `fault a: missing oxygen t (ms after the first): ${lost
          .map((t) => t - (lost[0] ?? 0))
          .slice(0, 40)
          .join(' ')} first ${new Date(lost[0] ?? 0).toISOString()}`,
      );
    }
    expect(pub.acked.size).toBe(msgs.length);
    expect(missingArchive).toBe(0);
    expect(missingDb).toBe(0);
    expect(db.byTs.size).toBe(expectedTs.size);
    // A message archived but not yet acknowledged at the kill comes again from the broker and is archived
    // twice (QoS 1 is at-least-once; the known limit case b reports): identical copies only.
    expect(a.conflicts).toBe(0);
    expect(db.duplicates).toBe(0);
  });
});
