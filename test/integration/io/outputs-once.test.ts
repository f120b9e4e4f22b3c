// Each stream position written once, against real destinations that keep every copy: a VictoriaMetrics of
// the test's own without deduplication and the shared Kafka (a topic of the test's own, three partitions).
// The crash is staged by hand: the ledger is put back to what a kill between the destination's answer and
// the ledger's write would leave (unclean, one batch behind), or removed, and a new sink is given the
// records again with their positions, as the daemon's resume does.
import { mkdtempSync } from 'node:fs';
import { mkdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Kafka, logLevel } from 'kafkajs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { createKafkaSink } from '../../../services/sinks/kafka-sink.js';
import { startControlledVm, type ControlledVm } from '../../faults/helpers/procs.js';
import { KAFKA_BROKERS, randomSuffix, requireService } from '../env.js';
import { vmExport } from './influx-http.js';
import { oxygenRecords, quietLogger } from './fixtures.js';

const root = mkdtempSync(join(tmpdir(), 'reefd-once-'));
let vm: ControlledVm;

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS.join(','));
  vm = await startControlledVm({ dedup: false });
});
afterAll(async () => {
  await vm?.stop();
  await rm(root, { recursive: true, force: true });
});

/** Records of several stations, index i at minute i (station i % 6). */
function records(site: string, from: number, n: number): DerivedRecord[] {
  return Array.from({ length: n }, (_, k) => {
    const i = from + k;
    return { ...oxygenRecords(1, { site, fromIndex: i })[0], station: `st${i % 6}` } as DerivedRecord;
  });
}

async function stagedLedger(file: string, content: object): Promise<void> {
  await mkdir(join(file, '..'), { recursive: true });
  await writeFile(file, JSON.stringify(content));
}

describe('database output: a batch that landed without its ledger entry is not sent again', () => {
  it('looks the uncertain batch up in VictoriaMetrics and sends only what is missing', async () => {
    const site = `once${randomSuffix()}`;
    const dir = join(root, site);
    const ledger = { file: join(dir, 'outputs', 'influx.json'), epoch: 'e1' };
    const make = () =>
      createInfluxSink({
        url: vm.url,
        api: 'v2',
        batchSize: 50,
        flushMs: 20,
        spoolDir: join(dir, 'spool'),
        spoolMaxMb: 4,
        logger: quietLogger(),
        ledger,
      });
    const a = await make();
    a.write(records(site, 0, 20), 0);
    await a.close();
    // The kill came after the database took positions 10..19 and before the ledger said so.
    await stagedLedger(ledger.file, { epoch: 'e1', hwm: { 0: 9 }, clean: false });
    const b = await make();
    b.write(records(site, 5, 25), 5); // the resume derives from an older checkpoint: 5..29
    await b.close();
    const series = await vmExport(vm.url, `{__name__="oxygen_o2_umol_kg",site="${site}"}`);
    const ts = series.flatMap((s) => s.timestamps);
    expect(ts).toHaveLength(30);
    expect(new Set(ts).size).toBe(30);
    expect(b.stats()).toMatchObject({ skipped: 15, written: 10 });
  });

  it('keeps two sensors of one kind at one station apart (sensor is a tag)', async () => {
    const site = `two${randomSuffix()}`;
    const sink = await createInfluxSink({
      url: vm.url,
      api: 'v2',
      batchSize: 50,
      flushMs: 20,
      spoolDir: join(root, site, 'spool'),
      spoolMaxMb: 4,
      logger: quietLogger(),
    });
    const base = oxygenRecords(10, { site });
    sink.write([
      ...base.map((r) => ({ ...r, sensor: 'o2-a' })),
      ...base.map((r) => ({ ...r, sensor: 'o2-b' })),
    ]);
    await sink.close();
    const series = await vmExport(vm.url, `{__name__="oxygen_o2_umol_kg",site="${site}"}`);
    expect(series.map((s) => s.metric.sensor).sort()).toEqual(['o2-a', 'o2-b']);
    expect(series.map((s) => s.timestamps.length)).toEqual([10, 10]);
  });
});

describe('Kafka output: what a partition holds is read back from it', () => {
  it('sends each position once per partition after a crash that lost the ledger', async () => {
    const topic = `reefd-once-${randomSuffix()}`;
    const site = `k${randomSuffix()}`;
    const client = new Kafka({
      clientId: 'once-test',
      brokers: [...KAFKA_BROKERS],
      logLevel: logLevel.NOTHING,
    });
    const admin = client.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 3 }], waitForLeaders: true });
    await admin.disconnect();
    const ledger = { file: join(root, topic, 'outputs', 'kafka.json'), epoch: 'e1' };
    const make = () =>
      createKafkaSink({
        brokers: KAFKA_BROKERS,
        clientId: 'once-test',
        topic,
        spoolDir: join(root, topic, 'spool'),
        spoolMaxMb: 4,
        logger: quietLogger(),
        flushMs: 20,
        ledger,
      });
    const a = await make();
    a.write(records(site, 0, 30), 0);
    await a.close();
    await rm(ledger.file); // nothing local: the topic alone says what it holds
    const b = await make();
    b.write(records(site, 10, 30), 10);
    await b.close();

    const got: { partition: number; pos: number; station: string; t: string }[] = [];
    const consumer = client.consumer({ groupId: `once-${randomSuffix()}` });
    await consumer.connect();
    await consumer.subscribe({ topic, fromBeginning: true });
    await consumer.run({
      eachMessage: async ({ partition, message }) => {
        const r = JSON.parse(message.value?.toString() ?? '{}') as { station: string; t: string };
        got.push({ partition, pos: Number(message.headers?.['reefd-pos']?.toString()), ...r });
      },
    });
    const end = Date.now() + 30_000;
    while (got.length < 40 && Date.now() < end) await new Promise((r) => setTimeout(r, 100));
    await new Promise((r) => setTimeout(r, 500));
    await consumer.disconnect();
    expect(got).toHaveLength(40);
    expect(new Set(got.map((g) => g.pos)).size).toBe(40);
    // One station, one partition, positions rising in it.
    for (const p of [0, 1, 2]) {
      const pos = got.filter((g) => g.partition === p).map((g) => g.pos);
      expect(pos).toEqual([...pos].sort((x, y) => x - y));
    }
    expect(b.stats()).toMatchObject({ skipped: 20, written: 10 });
  });
});
