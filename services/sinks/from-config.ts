// The outputs section of the configuration (libs/contract/config-schema.ts) as sink factory options.
// Secrets are resolved by the caller's resolver (services/config/load.ts resolveSecret) and go straight into
// the options, never into a log line.
import { join } from 'node:path';
import type { ReefdConfig, SecretRef } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import type { InfluxSinkOptions } from './influx-sink.js';
import type { KafkaSinkOptions } from './kafka-sink.js';

export type SecretResolver = (ref: SecretRef) => Promise<string>;

type Outputs = ReefdConfig['outputs'];

export async function influxSinkOptionsFromConfig(
  out: NonNullable<Outputs['influx']>,
  ctx: { dataDir: string; logger: Logger; secret: SecretResolver },
): Promise<InfluxSinkOptions> {
  return {
    url: out.url,
    api: out.api,
    org: out.org,
    bucket: out.bucket,
    db: out.db,
    token: out.token !== undefined ? await ctx.secret(out.token) : undefined,
    username: out.username,
    password: out.password !== undefined ? await ctx.secret(out.password) : undefined,
    tls: out.tls,
    batchSize: out.batch_size,
    flushMs: out.flush_ms,
    spoolDir: join(ctx.dataDir, 'spool', 'influx'),
    spoolMaxMb: out.spool_max_mb,
    logger: ctx.logger,
  };
}

export async function kafkaSinkOptionsFromConfig(
  out: NonNullable<Outputs['kafka']>,
  ctx: { dataDir: string; logger: Logger; secret: SecretResolver },
): Promise<KafkaSinkOptions> {
  return {
    brokers: out.brokers,
    clientId: out.client_id,
    topic: out.topic,
    tls: out.tls,
    sasl:
      out.sasl !== undefined
        ? {
            mechanism: out.sasl.mechanism,
            username: out.sasl.username,
            password: await ctx.secret(out.sasl.password),
          }
        : undefined,
    spoolDir: join(ctx.dataDir, 'spool', 'kafka'),
    spoolMaxMb: out.spool_max_mb,
    logger: ctx.logger,
  };
}
