// Fault (e): the data folder's disk fills up (a 2 MB tmpfs mounted on it). The archive refuses with
// REEFD_DISK_FULL, messages stay unacknowledged at the broker, no archive line is left damaged, and once
// space returns every message is archived and every oxygen record reaches the database.
import { execFileSync } from 'node:child_process';
import { openSync, writeSync, closeSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, countVm, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig } from './helpers/daemon.js';
import { startControlledVm, startPrivateMosquitto } from './helpers/procs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const env = caseEnv('e');
afterAll(() => env.cleanup());

/** Writes zeros until the file system says ENOSPC; returns the bytes written. */
function fillDisk(file: string): number {
  const fd = openSync(file, 'w');
  const chunk = Buffer.alloc(16 * 1024);
  let n = 0;
  try {
    for (;;) n += writeSync(fd, chunk);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOSPC') throw err;
  } finally {
    closeSync(fd);
  }
  // Fill the last bytes too.
  const fd2 = openSync(`${file}.tail`, 'w');
  try {
    for (;;) n += writeSync(fd2, Buffer.alloc(64));
  } catch {
    // ENOSPC
  } finally {
    closeSync(fd2);
  }
  return n;
}

describe('fault e: disk full on the data folder', () => {
  it('refuses cleanly, alerts, corrupts nothing and recovers when space returns', async () => {
    const { prefix, site, dataDir, archiveDir } = env;
    // Root mount of a small tmpfs (CI runs as root); unmounted after the case.
    execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=2m', 'tmpfs', dataDir]);
    env.defer(async () => execFileSync('umount', ['-l', dataDir]));
    const mosq = await startPrivateMosquitto();
    env.defer(() => mosq.stop());
    const vm = await startControlledVm({ dedup: false });
    env.defer(() => vm.stop());
    const cfg = writeConfig(faultConfig({ prefix, site, dataDir, mqttUrl: mosq.url, influxUrl: vm.url }));
    const d = await spawnDaemon(cfg);
    env.defer(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 1500 });
    const oxygenTs = msgs.filter((m) => m.kind === 'oxygen').map((m) => m.tMs);
    const first = msgs.slice(0, 500);
    await pub.publish(first);
    await waitFor(async () => (await countArchive(archiveDir, prefix)).byKey.size >= first.length, 10_000);

    const filler = join(dataDir, 'filler.bin');
    const filled = fillDisk(filler);
    await pub.publish(msgs.slice(500));
    const refused = await waitFor(async () => d.stderr().includes('REEFD_DISK_FULL'), 10_000);
    await sleep(2000);
    const whileFull = await countArchive(archiveDir, prefix);
    const healthyWhileFull = (await fetch(`${d.url}/healthz`)).ok;

    rmSync(filler, { force: true });
    rmSync(`${filler}.tail`, { force: true });
    // Bounds for a loaded 2-core machine: the archive and the outputs retry a full disk with backoffs of
    // at most 5 s, so recovery takes seconds; the waits end as soon as everything is there, and a real
    // loss still fails (the counts never reach the totals).
    const recovered = await waitFor(
      async () => (await countArchive(archiveDir, prefix)).byKey.size >= msgs.length,
      60_000,
      500,
    );
    await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenTs.length,
      60_000,
      500,
    );
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const missingDb = oxygenTs.filter((t) => !db.byTs.has(t)).length;
    summary('e (disk full)', {
      sent: pub.sent,
      acked: pub.acked.size,
      'filler bytes': filled,
      'archived while full': whileFull.byKey.size,
      'disk-full error': refused ? 'yes' : 'no',
      archived: a.byKey.size,
      'damaged archive lines': a.badLines,
      'archive redelivered copies': a.duplicates,
      recovered: recovered ? 'yes' : 'no',
      'oxygen expected': oxygenTs.length,
      'in db': db.byTs.size,
      'db duplicates': db.duplicates,
      'missing from db': missingDb,
    });
    expect(refused).toBe(true);
    expect(healthyWhileFull).toBe(true);
    expect(whileFull.byKey.size).toBeLessThan(msgs.length);
    expect(a.badLines).toBe(0);
    expect(a.conflicts).toBe(0);
    expect(a.byKey.size).toBe(msgs.length);
    expect(missingDb).toBe(0);
    expect(db.duplicates).toBe(0);
    expect(stopped.code).toBe(0);
  });
});
