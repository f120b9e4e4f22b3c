// A private single-node KRaft Kafka broker (the jars deploy/dev/services.sh uses, in .cache/kafka), on its
// own ports and folder, that a case can restart. Never the shared broker.
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pollUntil } from '../../integration/env.js';
import { REPO } from './daemon.js';
import { freePort, portOpen } from './procs.js';

export const KAFKA_LIBS = join(REPO, '.cache/kafka/3.9.2/libs');

export interface PrivateKafka {
  broker: string;
  /** SIGTERM (controlled shutdown), then start again on the same ports and log folder. */
  restart(downMs?: number): Promise<void>;
  stop(): Promise<void>;
}

const JVM = ['-Xms128m', '-Xmx384m', '-XX:+UseG1GC', '-XX:TieredStopAtLevel=1', '-Djava.awt.headless=true'];

export async function startPrivateKafka(): Promise<PrivateKafka> {
  if (!existsSync(KAFKA_LIBS))
    throw new Error(
      `REEFD_TEST_KAFKA_JARS: no Kafka jars in ${KAFKA_LIBS}; run deploy/dev/services.sh up once`,
    );
  const dir = mkdtempSync(join(tmpdir(), 'reefd-faults-kafka-'));
  const port = await freePort();
  const ctl = await freePort();
  const props = [
    'process.roles=broker,controller',
    'node.id=1',
    `controller.quorum.voters=1@127.0.0.1:${ctl}`,
    `listeners=PLAINTEXT://127.0.0.1:${port},CONTROLLER://127.0.0.1:${ctl}`,
    `advertised.listeners=PLAINTEXT://127.0.0.1:${port}`,
    'controller.listener.names=CONTROLLER',
    'inter.broker.listener.name=PLAINTEXT',
    'listener.security.protocol.map=CONTROLLER:PLAINTEXT,PLAINTEXT:PLAINTEXT',
    `log.dirs=${join(dir, 'data')}`,
    'num.partitions=1',
    'auto.create.topics.enable=true',
    'default.replication.factor=1',
    'min.insync.replicas=1',
    'offsets.topic.replication.factor=1',
    'offsets.topic.num.partitions=1',
    'transaction.state.log.replication.factor=1',
    'transaction.state.log.min.isr=1',
    'transaction.state.log.num.partitions=1',
    'group.initial.rebalance.delay.ms=0',
    'num.network.threads=1',
    'num.io.threads=2',
    '',
  ].join('\n');
  const conf = join(dir, 'server.properties');
  writeFileSync(conf, props);
  const log4j = join(dir, 'log4j.properties');
  writeFileSync(
    log4j,
    'log4j.rootLogger=ERROR, stderr\nlog4j.appender.stderr=org.apache.log4j.varia.NullAppender\n',
  );
  const cp = `${KAFKA_LIBS}/*`;
  const sysProps = [`-Dkafka.logs.dir=${join(dir, 'logs')}`, `-Dlog4j.configuration=file:${log4j}`];
  // A cluster id is 16 random bytes, base64url without padding.
  const clusterId = randomBytes(16).toString('base64url');
  execFileSync(
    'java',
    [...JVM, ...sysProps, '-cp', cp, 'kafka.tools.StorageTool', 'format', '-t', clusterId, '-c', conf],
    {
      stdio: 'ignore',
    },
  );
  let child: ChildProcess | undefined;
  const start = async (): Promise<void> => {
    child = spawn('java', [...JVM, ...sysProps, '-cp', cp, 'kafka.Kafka', conf], { stdio: 'ignore' });
    await pollUntil(
      'private Kafka listening',
      async () => ((await portOpen(port)) ? true : undefined),
      60_000,
      100,
    );
  };
  const halt = async (): Promise<void> => {
    const c = child;
    if (!c || c.exitCode !== null || c.signalCode !== null) return;
    const exited = new Promise<void>((r) => c.once('exit', () => r()));
    c.kill('SIGTERM');
    const t = setTimeout(() => c.kill('SIGKILL'), 20_000);
    await exited;
    clearTimeout(t);
  };
  await start();
  return {
    broker: `127.0.0.1:${port}`,
    restart: async (downMs = 1000) => {
      await halt();
      await new Promise((r) => setTimeout(r, downMs));
      await start();
    },
    stop: async () => {
      await halt();
      await rm(dir, { recursive: true, force: true });
    },
  };
}
