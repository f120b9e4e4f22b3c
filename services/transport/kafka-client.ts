// The Kafka client of every service (intake, outputs, edge bridge, shore member, state store): brokers,
// TLS, SASL and kafkajs' log lines through the service's logger, with the same bounded retries everywhere.
import { Kafka, logLevel, type SASLOptions } from 'kafkajs';
import type { Logger } from '../log/logger.js';
import { tlsOptions, type TlsFiles } from './tls.js';

/** SASL with the password resolved by the caller. */
export type KafkaSasl =
  { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string } | undefined;

export interface KafkaClientOptions {
  brokers: readonly string[];
  clientId: string;
  tls?: TlsFiles | undefined;
  sasl?: KafkaSasl;
  logger: Logger;
}

/** kafkajs log lines through pino, at the levels kafkajs gives them. */
export function kafkaLogCreator(logger: Logger) {
  return () =>
    ({ level, log }: { level: number; log: { message: string } & Record<string, unknown> }) => {
      const { message, ...rest } = log;
      if (level === logLevel.ERROR) logger.error(rest, `kafka: ${message}`);
      else if (level === logLevel.WARN) logger.warn(rest, `kafka: ${message}`);
      else logger.debug(rest, `kafka: ${message}`);
    };
}

export function kafkaClient(o: KafkaClientOptions): Kafka {
  const cfg: ConstructorParameters<typeof Kafka>[0] = {
    clientId: o.clientId,
    brokers: [...o.brokers],
    logLevel: logLevel.WARN,
    logCreator: kafkaLogCreator(o.logger),
    retry: { retries: 5, initialRetryTime: 300, maxRetryTime: 10_000 },
  };
  if (o.tls !== undefined) cfg.ssl = tlsOptions(o.tls);
  if (o.sasl !== undefined) cfg.sasl = { ...o.sasl } as SASLOptions;
  return new Kafka(cfg);
}
