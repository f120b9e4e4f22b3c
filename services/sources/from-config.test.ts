import { describe, it, expect } from 'vitest';
import pino from 'pino';
import { configSchema, type SecretRef } from '../../libs/contract/index.js';
import { mqttSourceOptionsFromConfig, kafkaSourceOptionsFromConfig } from './from-config.js';
import { influxSinkOptionsFromConfig } from '../sinks/from-config.js';

const cfg = configSchema.parse({
  site: 'demo-reef',
  reef_axis_deg: 270,
  stations: { crest: { sensors: { ctd: { kind: 'ctd' } } } },
  sources: {
    mqtt: {
      url: 'mqtts://broker.invalid:8883',
      username: 'reefd',
      password: { env: 'MQTT_PW' },
      tls: { ca_file: '/etc/ca.pem' },
    },
    kafka: {
      brokers: ['k1:9092'],
      topic: 'reef.raw',
      sasl: { mechanism: 'plain', username: 'u', password: { file: 'pw' } },
    },
  },
  outputs: {
    influx: {
      url: 'http://db.invalid:8086',
      api: 'v1',
      db: 'reef',
      password: { env: 'DB_PW' },
      username: 'w',
    },
  },
});
const secret = async (ref: SecretRef): Promise<string> =>
  'env' in ref ? `env:${ref.env}` : `file:${ref.file}`;
const logger = pino({ level: 'silent' });

describe('options from the configuration', () => {
  it('maps the mqtt source with the schema defaults (persistent session, 7 days expiry)', async () => {
    const o = await mqttSourceOptionsFromConfig(cfg, cfg.sources?.mqtt ?? expect.fail('no mqtt'), {
      logger,
      secret,
    });
    expect(o).toMatchObject({
      url: 'mqtts://broker.invalid:8883',
      clientId: 'reefd',
      username: 'reefd',
      password: 'env:MQTT_PW',
      cleanStart: false,
      sessionExpiryS: 604800,
      topicPrefix: 'reef',
      site: 'demo-reef',
      tls: { ca_file: '/etc/ca.pem', verify: true },
    });
  });

  it('maps the kafka source and the database output', async () => {
    const k = await kafkaSourceOptionsFromConfig(cfg, cfg.sources?.kafka ?? expect.fail('no kafka'), {
      logger,
      secret,
    });
    expect(k).toMatchObject({
      groupId: 'reefd',
      topic: 'reef.raw',
      sasl: { mechanism: 'plain', username: 'u', password: 'file:pw' },
    });
    const i = await influxSinkOptionsFromConfig(cfg.outputs.influx ?? expect.fail('no influx'), {
      dataDir: '/var/lib/reefd',
      logger,
      secret,
    });
    expect(i).toMatchObject({
      api: 'v1',
      db: 'reef',
      username: 'w',
      password: 'env:DB_PW',
      batchSize: 5000,
      flushMs: 1000,
      spoolMaxMb: 512,
      spoolDir: '/var/lib/reefd/spool/influx',
    });
  });
});
