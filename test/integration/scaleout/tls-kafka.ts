// A private single-node KRaft Kafka on 127.0.0.1 whose client listeners are TLS with client certificates
// required, and SASL/PLAIN over TLS, with a throwaway certificate authority made by openssl in a temporary
// folder. The broker reads PEM files directly (no Java keystore). Never the shared broker.
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { closeSync, existsSync, mkdtempSync, openSync, readFileSync, writeFileSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { KAFKA_LIBS } from '../../faults/helpers/kafka.js';
import { freePort, portOpen } from '../../faults/helpers/procs.js';
import { pollUntil } from '../env.js';

export interface TestPki {
  dir: string;
  caPem: string;
  clientPem: string;
  clientKey: string;
  /** A second authority the broker does not trust, with a client certificate of its own. */
  otherClientPem: string;
  otherClientKey: string;
}

/** Runs openssl in `cwd` with a command line whose words contain no spaces. */
function openssl(cwd: string, line: string): void {
  execFileSync('openssl', line.split(' '), { cwd, stdio: ['ignore', 'ignore', 'pipe'] });
}

function authority(dir: string, name: string): void {
  openssl(
    dir,
    `req -x509 -newkey rsa:2048 -nodes -days 2 -subj /CN=${name} -keyout ${name}.key -out ${name}.pem`,
  );
}

/** A key and a certificate signed by `ca`, with the extensions of `ext` (openssl extension lines). */
function issue(dir: string, ca: string, name: string, ext: string): void {
  writeFileSync(join(dir, `${name}.ext`), ext);
  openssl(dir, `req -newkey rsa:2048 -nodes -subj /CN=${name} -keyout ${name}.key -out ${name}.csr`);
  openssl(
    dir,
    `x509 -req -in ${name}.csr -CA ${ca}.pem -CAkey ${ca}.key -CAcreateserial -days 2 ` +
      `-extfile ${name}.ext -out ${name}.pem`,
  );
}

/** A CA, the broker's certificate for 127.0.0.1, a client certificate, and a client of an untrusted CA. */
export function makePki(dir: string): TestPki {
  authority(dir, 'ornen-test-ca');
  issue(
    dir,
    'ornen-test-ca',
    'broker',
    'subjectAltName=IP:127.0.0.1\nextendedKeyUsage=serverAuth,clientAuth\n',
  );
  issue(dir, 'ornen-test-ca', 'shore-client', 'extendedKeyUsage=clientAuth\n');
  authority(dir, 'stranger-ca');
  issue(dir, 'stranger-ca', 'stranger-client', 'extendedKeyUsage=clientAuth\n');
  // The broker's PEM keystore: its key, then its certificate chain.
  writeFileSync(
    join(dir, 'broker-keystore.pem'),
    readFileSync(join(dir, 'broker.key'), 'utf8') +
      readFileSync(join(dir, 'broker.pem'), 'utf8') +
      readFileSync(join(dir, 'ornen-test-ca.pem'), 'utf8'),
  );
  return {
    dir,
    caPem: join(dir, 'ornen-test-ca.pem'),
    clientPem: join(dir, 'shore-client.pem'),
    clientKey: join(dir, 'shore-client.key'),
    otherClientPem: join(dir, 'stranger-client.pem'),
    otherClientKey: join(dir, 'stranger-client.key'),
  };
}

export interface TlsKafka {
  /** TLS with client certificates required. */
  broker: string;
  /** SASL/PLAIN over TLS (server certificate only): user `SASL_USER` with `saslPassword`. */
  saslBroker: string;
  saslPassword: string;
  pki: TestPki;
  /** The broker's own output, for a failure message. */
  log(): string;
  stop(): Promise<void>;
}

export const SASL_USER = 'shore';

const JVM = ['-Xms128m', '-Xmx384m', '-XX:+UseG1GC', '-XX:TieredStopAtLevel=1', '-Djava.awt.headless=true'];

export async function startTlsKafka(): Promise<TlsKafka> {
  if (!existsSync(KAFKA_LIBS))
    throw new Error(
      `REEFD_TEST_KAFKA_JARS: no Kafka jars in ${KAFKA_LIBS}; run deploy/dev/services.sh up once`,
    );
  const dir = mkdtempSync(join(tmpdir(), 'reefd-tls-kafka-'));
  const pki = makePki(mkdtempSync(join(dir, 'pki-')));
  const port = await freePort();
  const saslPort = await freePort();
  const ctl = await freePort();
  const saslPassword = randomBytes(12).toString('hex');
  const props = [
    'process.roles=broker,controller',
    'node.id=1',
    `controller.quorum.voters=1@127.0.0.1:${ctl}`,
    `listeners=SSL://127.0.0.1:${port},SASL_SSL://127.0.0.1:${saslPort},CONTROLLER://127.0.0.1:${ctl}`,
    `advertised.listeners=SSL://127.0.0.1:${port},SASL_SSL://127.0.0.1:${saslPort}`,
    'controller.listener.names=CONTROLLER',
    'inter.broker.listener.name=SSL',
    'listener.security.protocol.map=CONTROLLER:PLAINTEXT,SSL:SSL,SASL_SSL:SASL_SSL',
    'sasl.enabled.mechanisms=PLAIN',
    'listener.name.sasl_ssl.plain.sasl.jaas.config=org.apache.kafka.common.security.plain.PlainLoginModule ' +
      `required user_${SASL_USER}="${saslPassword}";`,
    'listener.name.sasl_ssl.ssl.client.auth=none',
    'ssl.keystore.type=PEM',
    `ssl.keystore.location=${join(pki.dir, 'broker-keystore.pem')}`,
    'ssl.truststore.type=PEM',
    `ssl.truststore.location=${pki.caPem}`,
    'ssl.client.auth=required',
    `log.dirs=${join(dir, 'data')}`,
    'num.partitions=1',
    'auto.create.topics.enable=false',
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
    'log4j.rootLogger=WARN, stderr\nlog4j.appender.stderr=org.apache.log4j.ConsoleAppender\n' +
      'log4j.appender.stderr.Target=System.err\nlog4j.appender.stderr.layout=org.apache.log4j.PatternLayout\n' +
      'log4j.appender.stderr.layout.ConversionPattern=%d %p %m%n\n',
  );
  const cp = `${KAFKA_LIBS}/*`;
  const sysProps = [`-Dkafka.logs.dir=${join(dir, 'logs')}`, `-Dlog4j.configuration=file:${log4j}`];
  const clusterId = randomBytes(16).toString('base64url');
  execFileSync(
    'java',
    [...JVM, ...sysProps, '-cp', cp, 'kafka.tools.StorageTool', 'format', '-t', clusterId, '-c', conf],
    { stdio: 'ignore' },
  );
  const logFile = join(dir, 'broker.log');
  const fd = openSync(logFile, 'a');
  const child: ChildProcess = spawn('java', [...JVM, ...sysProps, '-cp', cp, 'kafka.Kafka', conf], {
    stdio: ['ignore', fd, fd],
  });
  closeSync(fd);
  const log = (): string => (existsSync(logFile) ? readFileSync(logFile, 'utf8').slice(-4000) : '');
  const halt = async (): Promise<void> => {
    if (child.exitCode !== null || child.signalCode !== null) return;
    const exited = new Promise<void>((r) => child.once('exit', () => r()));
    child.kill('SIGTERM');
    const t = setTimeout(() => child.kill('SIGKILL'), 20_000);
    await exited;
    clearTimeout(t);
  };
  try {
    await pollUntil(
      'private TLS Kafka listening',
      async () => {
        if (child.exitCode !== null) throw new Error(`broker exited ${child.exitCode}: ${log()}`);
        return (await portOpen(port)) && (await portOpen(saslPort)) ? true : undefined;
      },
      60_000,
      100,
    );
  } catch (err) {
    await halt();
    throw err;
  }
  return {
    broker: `127.0.0.1:${port}`,
    saslBroker: `127.0.0.1:${saslPort}`,
    saslPassword,
    pki,
    log,
    stop: async () => {
      await halt();
      await rm(dir, { recursive: true, force: true });
    },
  };
}
