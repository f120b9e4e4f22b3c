// The shore member over TLS against a real broker: a private Kafka whose only client listener is TLS with
// client certificates required. A site file names the CA and the client certificate in sources.kafka; the
// member's consumer and its state-topic store connect with what the site file gives (as `reefd shore`
// resolves it), consume what a TLS producer (the edge bridge) wrote, and derive records. Clients without
// the CA, or with a certificate of another authority, are refused. The same over SASL/PLAIN on TLS, with
// the password read from the secret file the site file names.
import { chmod, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Kafka, logLevel } from 'kafkajs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { createEdgeBridge } from '../../../services/scaleout/edge-bridge.js';
import { createKafkaStateStore } from '../../../services/scaleout/kafka-state-store.js';
import { startShoreHttp, type ShorePhase } from '../../../services/scaleout/shore-http.js';
import { createDirectoryStateStore } from '../../../services/scaleout/state-store.js';
import { shoreKafkaSecurity } from '../../../services/scaleout/shore-security.js';
import { loadShoreSites } from '../../../services/scaleout/shore-sites.js';
import { createShoreMember } from '../../../services/scaleout/shore.js';
import { tlsOptions } from '../../../services/transport/tls.js';
import { kafkaClient } from '../../../services/transport/kafka-client.js';
import { pollUntil } from '../env.js';
import { quietLogger } from '../io/fixtures.js';
import { deployment } from './fixtures.js';
import { SASL_USER, startTlsKafka, type TlsKafka } from './tls-kafka.js';

const DEMO = path.resolve(import.meta.dirname, '../../../deploy/demo/ornen-reef.yaml');
const START_MS = Date.UTC(2026, 10, 20, 0, 0, 0);
const TOPIC = 'reef.raw';

let kafka: TlsKafka;
let siteDir: string;

beforeAll(async () => {
  kafka = await startTlsKafka();
  siteDir = await mkdtemp(path.join(tmpdir(), 'reefd-shore-tls-site-'));
}, 120_000);

afterAll(async () => {
  await kafka?.stop();
  if (siteDir) await rm(siteDir, { recursive: true, force: true });
});

/** A client that fails fast: the question is whether the broker lets it in, not whether it retries. */
function bareClient(
  ssl: ReturnType<typeof tlsOptions>,
  broker = kafka.broker,
  sasl?: { mechanism: 'plain'; username: string; password: string },
): Kafka {
  return new Kafka({
    clientId: 'reefd-it-tls-probe',
    brokers: [broker],
    ssl,
    ...(sasl !== undefined ? { sasl } : {}),
    connectionTimeout: 5_000,
    retry: { retries: 0 },
    logLevel: logLevel.NOTHING,
  });
}

describe('shore member over TLS (private broker, client certificates required)', () => {
  it('consumes what a TLS producer wrote, derives records and stores its state over TLS', async () => {
    // The site file names the CA and the client certificate relative to itself, as a field team writes it.
    const pkiRel = path.relative(siteDir, kafka.pki.dir);
    const siteFile = path.join(siteDir, 'ornen-reef.yaml');
    await writeFile(
      siteFile,
      (await readFile(DEMO, 'utf8')) +
        '\nsources:\n  kafka:\n' +
        `    brokers: ["${kafka.broker}"]\n    topic: ${TOPIC}\n    tls:\n` +
        `      ca_file: ${pkiRel}/ornen-test-ca.pem\n` +
        `      cert_file: ${pkiRel}/shore-client.pem\n` +
        `      key_file: ${pkiRel}/shore-client.key\n`,
    );
    const { sites, processorOptions } = await loadShoreSites([siteFile]);
    const security = await shoreKafkaSecurity(
      sites.map((config) => ({ config, file: siteFile })),
      {},
    );
    expect(security.tls?.ca_file).toBe(kafka.pki.caPem);
    expect(security.tls?.cert_file).toBe(kafka.pki.clientPem);
    const cfg = sites[0];
    if (cfg === undefined) throw new Error('no site loaded');
    const logger = quietLogger();
    const brokers = [kafka.broker];

    const admin = kafkaClient({ brokers, clientId: 'reefd-it-tls-admin', tls: security.tls, logger }).admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic: TOPIC, numPartitions: 1 }], waitForLeaders: true });

    // The TLS producer: the edge bridge with the same files.
    const msgs = deployment([cfg], START_MS, 3600_000);
    expect(msgs.length).toBeGreaterThan(100);
    const spoolDir = await mkdtemp(path.join(tmpdir(), 'reefd-edge-tls-'));
    const bridge = await createEdgeBridge({
      brokers,
      clientId: 'reefd-it-tls-edge',
      topic: TOPIC,
      tls: security.tls,
      spoolDir,
      spoolMaxMb: 64,
      logger,
    });
    for (const m of msgs) bridge.forward(m.message, m.rxMs);
    await bridge.flush();
    await bridge.close();
    await rm(spoolDir, { recursive: true, force: true });
    const [end] = await admin.fetchTopicOffsets(TOPIC);
    await admin.disconnect();
    const high = BigInt(end?.high ?? '0');
    // Every message reached the broker over TLS (the spool holds none).
    expect(high).toBe(BigInt(msgs.length));

    const store = await createKafkaStateStore({
      brokers,
      clientId: 'reefd-it-tls-shore-state',
      topic: `${TOPIC}.state`,
      tls: security.tls,
      sasl: security.sasl,
      logger,
    });
    const records: DerivedRecord[] = [];
    const member = createShoreMember({
      sites,
      processorOptions,
      brokers,
      clientId: 'reefd-it-tls-shore',
      groupId: 'reefd-it-tls-shore',
      topic: TOPIC,
      tls: security.tls,
      sasl: security.sasl,
      store,
      snapshotEveryMs: 60_000,
      onRecords: (r) => records.push(...r),
      logger,
    });
    let phase: ShorePhase = 'starting';
    const http = await startShoreHttp({ member, phase: () => phase, port: 0, withDefaults: false });
    try {
      await member.start();
      phase = 'running';
      await pollUntil(
        'shore member at the end of the raw topic',
        async () => (member.positions().get(0) === high ? true : undefined),
        60_000,
      );
      // What an operator scrapes while the member runs.
      const health = await fetch(`http://${http.address}/healthz`);
      expect(health.status).toBe(200);
      const metrics = await (await fetch(`http://${http.address}/metrics`)).text();
      expect(metrics).toContain(`reefd_shore_messages_total{outcome="processed"} ${msgs.length}`);
      expect(metrics).toContain('reefd_shore_partitions_assigned 1');
      // A graceful stop stores the site's state on the state topic (over TLS) and commits the offset.
      await member.stop();
      const st = member.stats();
      expect(st.messages).toBe(msgs.length);
      expect(st.rejected).toBe(0);
      expect(st.unknownSite).toBe(0);
      expect(st.records).toBe(records.length);
      expect(records.length).toBeGreaterThan(0);
      expect(new Set(records.map((r) => r.site))).toEqual(new Set([cfg.site]));
      // An hour of the demo's stations gives more than one kind of record (not only the per-message ones).
      const types = new Set(records.map((r) => r.type));
      expect(types.size).toBeGreaterThan(1);
      expect(member.storedAt().get(0)).toBe(high);
      const entry = await store.load(cfg.site);
      expect(entry?.offset).toBe(high.toString());
      expect(entry?.partition).toBe(0);
    } finally {
      await member.kill();
      await store.close();
      await http.close();
    }
  });

  it('refuses a client without the CA and a client whose certificate another authority signed', async () => {
    const pki = kafka.pki;
    // Without the CA the client cannot verify the broker and gives up before sending anything.
    const noCa = bareClient(tlsOptions({ cert_file: pki.clientPem, key_file: pki.clientKey }));
    const a = noCa.admin();
    await expect(a.connect()).rejects.toThrow(/certificate/i);
    await a.disconnect();
    // With the CA but a certificate of an authority the broker does not trust, the broker ends the handshake.
    const stranger = bareClient(
      tlsOptions({ ca_file: pki.caPem, cert_file: pki.otherClientPem, key_file: pki.otherClientKey }),
    );
    const b = stranger.admin();
    await expect(b.connect()).rejects.toThrow(/certificate unknown/i);
    await b.disconnect();
    // The same CA with the right client certificate is let in: the refusals above are about trust alone.
    const trusted = bareClient(
      tlsOptions({ ca_file: pki.caPem, cert_file: pki.clientPem, key_file: pki.clientKey }),
    );
    const c = trusted.admin();
    await c.connect();
    const cluster = await c.describeCluster();
    expect(cluster.brokers.map((x) => `${x.host}:${x.port}`)).toEqual([kafka.broker]);
    await c.disconnect();
  });

  it('over SASL/PLAIN on TLS, with the password from the secret file the site file names', async () => {
    const dir = await mkdtemp(path.join(siteDir, 'sasl-'));
    const pw = path.join(dir, 'shore.pw');
    await writeFile(pw, `${kafka.saslPassword}\n`);
    await chmod(pw, 0o600);
    const siteFile = path.join(dir, 'ornen-reef.yaml');
    await writeFile(
      siteFile,
      (await readFile(DEMO, 'utf8')) +
        '\nsources:\n  kafka:\n' +
        `    brokers: ["${kafka.saslBroker}"]\n    topic: reef.raw.sasl\n` +
        `    tls: { ca_file: ${kafka.pki.caPem} }\n` +
        `    sasl: { mechanism: plain, username: ${SASL_USER}, password: { file: shore.pw } }\n`,
    );
    const { sites, processorOptions } = await loadShoreSites([siteFile]);
    const security = await shoreKafkaSecurity(
      sites.map((config) => ({ config, file: siteFile })),
      {},
    );
    expect(security.sasl).toEqual({ mechanism: 'plain', username: SASL_USER, password: kafka.saslPassword });
    const cfg = sites[0];
    if (cfg === undefined) throw new Error('no site loaded');
    const logger = quietLogger();
    const brokers = [kafka.saslBroker];
    const topic = 'reef.raw.sasl';
    const client = kafkaClient({ brokers, clientId: 'reefd-it-sasl-admin', ...security, logger });
    const admin = client.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 1 }], waitForLeaders: true });
    const msgs = deployment([cfg], START_MS, 1800_000);
    const spoolDir = await mkdtemp(path.join(dir, 'spool-'));
    const bridge = await createEdgeBridge({
      brokers,
      clientId: 'reefd-it-sasl-edge',
      topic,
      tls: security.tls,
      sasl: security.sasl,
      spoolDir,
      spoolMaxMb: 64,
      logger,
    });
    for (const m of msgs) bridge.forward(m.message, m.rxMs);
    await bridge.flush();
    await bridge.close();
    const [end] = await admin.fetchTopicOffsets(topic);
    await admin.disconnect();
    const high = BigInt(end?.high ?? '0');
    expect(high).toBe(BigInt(msgs.length));
    const records: DerivedRecord[] = [];
    const member = createShoreMember({
      sites,
      processorOptions,
      brokers,
      clientId: 'reefd-it-sasl-shore',
      groupId: 'reefd-it-sasl-shore',
      topic,
      tls: security.tls,
      sasl: security.sasl,
      store: createDirectoryStateStore(path.join(dir, 'state')),
      onRecords: (r) => records.push(...r),
      logger,
    });
    try {
      await member.start();
      await pollUntil(
        'SASL shore member at the end of the raw topic',
        async () => (member.positions().get(0) === high ? true : undefined),
        60_000,
      );
      expect(member.stats().messages).toBe(msgs.length);
      expect(member.stats().rejected).toBe(0);
      expect(records.length).toBeGreaterThan(0);
    } finally {
      await member.kill();
    }
    // A wrong password is refused by the broker.
    const wrong = bareClient(tlsOptions({ ca_file: kafka.pki.caPem }), kafka.saslBroker, {
      mechanism: 'plain',
      username: SASL_USER,
      password: 'not-the-password',
    });
    const w = wrong.admin();
    await expect(w.connect()).rejects.toThrow(/authentication|SASL/i);
    await w.disconnect();
  });
});
