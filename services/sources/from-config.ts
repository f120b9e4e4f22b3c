// The sources section of the configuration as source factory options (secrets resolved by the caller).
import type { ReefdConfig } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import type { SecretResolver } from '../sinks/from-config.js';
import type { KafkaSourceOptions } from './kafka-source.js';
import type { MqttSourceOptions } from './mqtt-source.js';

type Sources = NonNullable<ReefdConfig['sources']>;

export async function mqttSourceOptionsFromConfig(
  cfg: ReefdConfig,
  src: NonNullable<Sources['mqtt']>,
  ctx: { logger: Logger; secret: SecretResolver },
): Promise<MqttSourceOptions> {
  return {
    url: src.url,
    clientId: src.client_id,
    username: src.username,
    password: src.password !== undefined ? await ctx.secret(src.password) : undefined,
    tls: src.tls,
    cleanStart: src.clean_start,
    sessionExpiryS: src.session_expiry_s,
    topicPrefix: cfg.topic_prefix,
    site: cfg.site,
    logger: ctx.logger,
  };
}

export async function kafkaSourceOptionsFromConfig(
  cfg: ReefdConfig,
  src: NonNullable<Sources['kafka']>,
  ctx: { logger: Logger; secret: SecretResolver },
): Promise<KafkaSourceOptions> {
  return {
    brokers: src.brokers,
    clientId: src.client_id,
    groupId: src.group_id,
    topic: src.topic,
    topicPrefix: cfg.topic_prefix,
    tls: src.tls,
    sasl:
      src.sasl !== undefined
        ? {
            mechanism: src.sasl.mechanism,
            username: src.sasl.username,
            password: await ctx.secret(src.sasl.password),
          }
        : undefined,
    logger: ctx.logger,
  };
}
