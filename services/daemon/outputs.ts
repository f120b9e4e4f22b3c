// The record outputs of a site configuration (NDJSON, the time-series database, Kafka), built once for the
// daemon and for a shore processor member alike.
import path from 'node:path';
import type { ReefdConfig, SecretRef } from '../../libs/contract/index.js';
import { resolveSecret } from '../config/load.js';
import type { Logger } from '../log/logger.js';
import type { RecordSink } from '../pipeline/types.js';
import { createInfluxSink, createKafkaSink, createNdjsonSink } from '../sinks/index.js';
import type { TlsFiles } from '../transport/tls.js';

export interface OutputContext {
  config: ReefdConfig;
  /** Folder relative paths of the configuration are relative to. */
  baseDir: string;
  /** The data folder (spools live under `<dataDir>/spool/<sink>`). */
  dataDir: string;
  env: Readonly<Record<string, string | undefined>>;
  logger: Logger;
  onSpoolNearLimit?: (sink: string, bytes: number, maxBytes: number) => void;
  /** An output refused the credentials (true) or took a batch again (false). */
  onAuth?: (sink: string, failing: boolean, err?: Error) => void;
  /**
   * The daemon's record stream: each output keeps a delivery ledger under `<dataDir>/outputs/` and writes
   * each stream position once (services/pipeline/types.ts). Absent for shore members (at least once).
   */
  stream?: { epoch: string };
}

/** The delivery ledger of one output. */
export function ledgerFile(dataDir: string, output: string): string {
  return path.join(dataDir, 'outputs', `${output}.json`);
}

/** TLS file names of the configuration, resolved against the configuration's folder. */
export function tlsFiles(baseDir: string, tls: TlsFiles | undefined): TlsFiles | undefined {
  if (!tls) return undefined;
  const r = (f: string | undefined) => (f ? path.resolve(baseDir, f) : undefined);
  return {
    ca_file: r(tls.ca_file),
    cert_file: r(tls.cert_file),
    key_file: r(tls.key_file),
    verify: tls.verify,
  };
}

export function secretResolver(c: Pick<OutputContext, 'env' | 'baseDir'>) {
  return async (ref: SecretRef | undefined) => (ref ? resolveSecret(ref, c.env, c.baseDir) : undefined);
}

/** SASL settings with the password resolved from its secret reference. */
export async function resolveSasl(
  c: Pick<OutputContext, 'env' | 'baseDir'>,
  s:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: SecretRef }
    | undefined,
) {
  return s
    ? { mechanism: s.mechanism, username: s.username, password: (await secretResolver(c)(s.password)) ?? '' }
    : undefined;
}

export async function createOutputs(c: OutputContext): Promise<RecordSink[]> {
  const secret = secretResolver(c);
  const sinks: RecordSink[] = [];
  const ledger = (name: string) =>
    c.stream === undefined ? {} : { ledger: { file: ledgerFile(c.dataDir, name), epoch: c.stream.epoch } };
  // Built one after the other: a failure closes what is already open and the start fails cleanly.
  try {
    await build(c, sinks, ledger, secret);
  } catch (err) {
    await Promise.allSettled(sinks.map((s) => s.close()));
    throw err;
  }
  return sinks;
}

async function build(
  c: OutputContext,
  sinks: RecordSink[],
  ledger: (name: string) => { ledger?: { file: string; epoch: string } },
  secret: ReturnType<typeof secretResolver>,
): Promise<void> {
  const out = c.config.outputs;
  if (out.ndjson) {
    const l = ledger('ndjson').ledger;
    sinks.push(
      await createNdjsonSink({
        name: 'ndjson',
        path: path.resolve(c.baseDir, out.ndjson.path),
        ...(l !== undefined ? { ledger: { ...l, logger: c.logger } } : {}),
      }),
    );
  }
  if (out.influx) {
    const i = out.influx;
    sinks.push(
      await createInfluxSink({
        name: `influx-${i.api}`,
        url: i.url,
        api: i.api,
        org: i.org,
        bucket: i.bucket,
        db: i.db,
        token: await secret(i.token),
        username: i.username,
        password: await secret(i.password),
        tls: tlsFiles(c.baseDir, i.tls),
        batchSize: i.batch_size,
        flushMs: i.flush_ms,
        spoolDir: path.join(c.dataDir, 'spool', 'influx'),
        spoolMaxMb: i.spool_max_mb,
        stringFields: i.string_fields,
        logger: c.logger,
        onNearLimit: (s) => c.onSpoolNearLimit?.('influx', s.spoolBytes, s.maxBytes),
        onAuth: (failing, err) => c.onAuth?.('influx', failing, err),
        ...ledger('influx'),
      }),
    );
  }
  if (out.kafka) {
    const k = out.kafka;
    sinks.push(
      await createKafkaSink({
        brokers: k.brokers,
        clientId: k.client_id,
        topic: k.topic,
        tls: tlsFiles(c.baseDir, k.tls),
        sasl: await resolveSasl(c, k.sasl),
        spoolDir: path.join(c.dataDir, 'spool', 'kafka'),
        spoolMaxMb: k.spool_max_mb,
        logger: c.logger,
        ...ledger('kafka'),
      }),
    );
  }
}
