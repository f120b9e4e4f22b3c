// Fault (f): 100,000 malformed messages mixed with good ones. Every good one is processed, every message
// (good or bad) is archived, the daemon's memory stays bounded, and the dead-letter output is rate-limited.
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, countVm, summary, waitFor } from './helpers/count.js';
import { faultConfig, GC_PROBE, spawnDaemon, writeConfig } from './helpers/daemon.js';
import { startControlledVm, startPrivateMosquitto } from './helpers/procs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, oxygenSeries, type Msg } from './helpers/traffic.js';

const env = caseEnv('f');
afterAll(() => env.cleanup());

const BAD = 100_000;
const DEAD_LETTER_PER_MIN = 300;

/** Eight kinds of garbage, each a reject for its own reason (never a valid message). */
function garbage(prefix: string, site: string, i: number): Msg {
  const t = new Date(Date.now() - 3600_000 + (i % 1000)).toISOString();
  const ox = `${prefix}/${site}/s1/oxygen/o1`;
  const variants: [string, string][] = [
    [ox, `{"v":1,"t":"${t}","o2_umol_l":`], // cut short
    [ox, JSON.stringify({ v: 2, t, o2_umol_l: 200, temp_c: 27 })], // unknown version
    [ox, JSON.stringify({ v: 1, t, o2_umol_l: 200 })], // no temperature
    [`${prefix}/${site}/s1/ctd/c1`, JSON.stringify({ v: 1, t, temp_c: 'warm', sal: 35 })], // wrong type
    [`${prefix}/${site}/s1/oxygen/zz`, JSON.stringify({ v: 1, t, o2_umol_l: 200, temp_c: 27 })], // unknown sensor
    [ox, JSON.stringify({ v: 1, t: 'yesterday', o2_umol_l: 200, temp_c: 27 })], // bad time
    [ox, '\u0000\u00ff\ufffd binary \u0007'], // not JSON
    [
      ox,
      JSON.stringify({
        v: 1,
        t,
        o2_umol_l: 200,
        temp_c: 27,
        pad: 'x'.repeat(6000),
        nested: [[[[[1]]]]],
      }).replace('"o2_umol_l":200', '"o2_umol_l":-1e309'),
    ], // big, non-finite
  ];
  const [topic, payload] = variants[i % variants.length] as [string, string];
  return { topic, payload, key: `bad/${i}`, kind: 'garbage', tMs: 0 };
}

describe('fault f: a flood of malformed messages', () => {
  it('processes every good message, bounds memory, rate-limits dead letters', async () => {
    const mosq = await startPrivateMosquitto();
    env.defer(() => mosq.stop());
    const vm = await startControlledVm({ dedup: false });
    env.defer(() => vm.stop());
    const { prefix, site, dataDir, archiveDir } = env;
    const cfg = writeConfig(
      faultConfig({
        prefix,
        site,
        dataDir,
        mqttUrl: mosq.url,
        influxUrl: vm.url,
        deadLetterPerMin: DEAD_LETTER_PER_MIN,
      }),
    );
    const d = await spawnDaemon(cfg, 'warn', GC_PROBE);
    env.defer(() => d.kill('SIGKILL'));
    const rss0 = await d.rssBytes();
    const settled0 = await d.settledMemory();
    const good = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 2000 });
    const oxygenTs = good.filter((m) => m.kind === 'oxygen').map((m) => m.tMs);
    // Interleave: one good message after every 49 bad ones, good ones in their own order.
    const msgs: Msg[] = [];
    let g = 0;
    for (let i = 0; i < BAD; i++) {
      msgs.push(garbage(prefix, site, i));
      if (i % 49 === 48 && g < good.length) msgs.push(good[g++] as Msg);
    }
    while (g < good.length) msgs.push(good[g++] as Msg);

    let peakRss = rss0;
    const sampler = setInterval(() => {
      d.rssBytes()
        .then((r) => (peakRss = Math.max(peakRss, r)))
        .catch(() => undefined);
    }, 100);
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const t0 = Date.now();
    // Two halves: bounded memory means the second half adds (almost) nothing to the first half's peak.
    const half = Math.floor(msgs.length / 2);
    await pub.publish(msgs.slice(0, half), 1000);
    await waitFor(async () => (await d.metric('reefd_messages_in_total')) >= half, 30_000, 200);
    const peakHalf = peakRss;
    const settledHalf = await d.settledMemory();
    await pub.publish(msgs.slice(half), 1000);
    const publishMs = Date.now() - t0;
    const total = msgs.length;
    await waitFor(async () => (await d.metric('reefd_messages_in_total')) >= total, 30_000, 500);
    await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenTs.length,
      15_000,
      500,
    );
    clearInterval(sampler);
    const received = await d.metric('reefd_messages_in_total');
    const settledEnd = await d.settledMemory();
    const rejects = await d.metric('reefd_rejects_total');
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const deadLetters = (await readFile(join(dataDir, 'dead-letter.ndjson'), 'utf8'))
      .split('\n')
      .filter((l) => l.trim() !== '').length;
    const missingDb = oxygenTs.filter((t) => !db.byTs.has(t)).length;
    const goodArchived = good.filter((m) => a.byKey.has(m.key)).length;
    summary('f (malformed flood)', {
      sent: pub.sent,
      acked: pub.acked.size,
      bad: BAD,
      good: good.length,
      'publish s': (publishMs / 1000).toFixed(1),
      received,
      rejected: rejects,
      'archive lines': a.lines,
      'archived rejected': a.rejected,
      'good archived': goodArchived,
      'oxygen expected': oxygenTs.length,
      'in db': db.byTs.size,
      'db duplicates': db.duplicates,
      'dead-letter lines': deadLetters,
      'rss start MB': (rss0 / 2 ** 20).toFixed(0),
      'rss peak after half MB': (peakHalf / 2 ** 20).toFixed(0),
      'rss peak MB': (peakRss / 2 ** 20).toFixed(0),
      'heap after GC at start, half, end MB': [settled0, settledHalf, settledEnd]
        .map((m) => (m.heapUsed / 2 ** 20).toFixed(1))
        .join(', '),
      'external after GC at half, end MB': [settledHalf, settledEnd]
        .map((m) => (m.external / 2 ** 20).toFixed(1))
        .join(', '),
    });
    expect(stopped.code).toBe(0);
    expect(pub.acked.size).toBe(total);
    expect(received).toBe(total);
    expect(rejects).toBe(BAD);
    expect(a.lines).toBe(total);
    expect(a.rejected).toBe(BAD);
    expect(goodArchived).toBe(good.length);
    expect(missingDb).toBe(0);
    expect(db.duplicates).toBe(0);
    // Rate limit: the bucket holds one minute's allowance, plus at most one summary line per minute.
    const minutes = Math.ceil((Date.now() - t0) / 60_000);
    expect(deadLetters).toBeLessThanOrEqual(DEAD_LETTER_PER_MIN * (minutes + 1) + minutes + 1);
    expect(deadLetters).toBeGreaterThan(0);
    // Memory: bounded by the in-flight window (MQTT Receive Maximum) and the fixed-size memories (the
    // redelivery keys, the windows), not by the flood. Measured after a forced GC that has settled (the
    // RSS above is for the record only: it follows the allocator and the machine's load, not the data
    // kept), so the check is the same on a loaded machine: the second 51 k messages leave the live heap
    // where the first 51 k left it, and it stays small.
    expect(settledEnd.heapUsed - settledHalf.heapUsed).toBeLessThan(16 * 2 ** 20);
    expect(settledEnd.external - settledHalf.external).toBeLessThan(16 * 2 ** 20);
    expect(settledEnd.heapUsed).toBeLessThan(128 * 2 ** 20);
  });
});
