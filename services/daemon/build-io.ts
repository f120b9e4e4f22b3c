// The daemon's start-up steps that talk to the outside: clients on the broker and Kafka, the notifier,
// the record outputs and dead letters, the sources, systemd. Each returns what it made and registers how
// to close it (lifecycle.ts); none refers to a part built after it.
import path from 'node:path';
import mqtt from 'mqtt';
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import {
  alertsStateDir,
  channelsFromConfig,
  createNotifier,
  notifierOptionsFromConfig,
  type Notifier,
} from '../notifiers/index.js';
import type { DeadLetterSink, RawInput, RecordSink, Source } from '../pipeline/types.js';
import { createDeadLetterSink, kafkaPublisher, mqttPublisher, type TopicPublisher } from '../sinks/index.js';
import { createKafkaSource, createMqttSource } from '../sources/index.js';
import { kafkaClient } from '../transport/kafka-client.js';
import { tlsOptions } from '../transport/tls.js';
import type { StartContext } from './context.js';
import { operationalAlert } from './operational.js';
import { createOutputs, resolveSasl, tlsFiles } from './outputs.js';
import { createSystemdNotifier } from './systemd.js';
import { errFields } from '../log/logger.js';

type MqttSourceConfig = NonNullable<NonNullable<ReefdConfig['sources']>['mqtt']>;

export interface Clients {
  deadLetterMqtt?: { publisher: TopicPublisher; topic: string };
  deadLetterKafka?: { publisher: TopicPublisher; topic: string };
  notifyMqtt?: mqtt.MqttClient;
}

/** A second MQTT client on the source broker (dead letters, notifications), never the intake's own. */
async function auxMqtt(ctx: StartContext, m: MqttSourceConfig, role: string): Promise<mqtt.MqttClient> {
  const password = await ctx.secret(m.password);
  const client = mqtt.connect(m.url, {
    clientId: `${m.client_id}-${role}`,
    protocolVersion: ctx.mqttProtocolVersion,
    ...(m.username !== undefined ? { username: m.username } : {}),
    ...(password !== undefined ? { password } : {}),
    ...(tlsOptions(tlsFiles(ctx.baseDir, m.tls)) as Record<string, unknown>),
  });
  const logger = ctx.logger.child({ component: 'clients' });
  client.on('error', (err) => logger.warn({ ...errFields(err), role }, 'auxiliary mqtt client error'));
  return ctx.life.add(`mqtt client ${role}`, client, (c) => c.endAsync());
}

/** Step 1: clients for dead letters and notifications on the broker and Kafka. */
export async function buildClients(ctx: StartContext): Promise<Clients> {
  const { config } = ctx;
  const out: Clients = {};
  const dl = config.outputs.dead_letter;
  const mqttSource = config.sources?.mqtt;
  if (dl.mqtt_topic !== undefined && mqttSource) {
    const client = await auxMqtt(ctx, mqttSource, 'deadletter');
    out.deadLetterMqtt = { publisher: mqttPublisher(client), topic: dl.mqtt_topic };
  }
  const kc = config.outputs.kafka ?? config.sources?.kafka;
  if (dl.kafka_topic !== undefined && kc) {
    const producer = kafkaClient({
      brokers: kc.brokers,
      clientId: `${kc.client_id}-deadletter`,
      tls: tlsFiles(ctx.baseDir, kc.tls),
      sasl: await resolveSasl({ env: ctx.env, baseDir: ctx.baseDir }, kc.sasl),
      logger: ctx.logger.child({ component: 'clients' }),
    }).producer();
    ctx.life.add('dead-letter kafka producer', producer, (p) => p.disconnect());
    await producer
      .connect()
      .catch((err: unknown) =>
        ctx.logger
          .child({ component: 'clients' })
          .warn(errFields(err), 'dead-letter kafka producer not connected yet'),
      );
    out.deadLetterKafka = { publisher: kafkaPublisher(producer), topic: dl.kafka_topic };
  }
  const notify = config.notify;
  const wantsMqtt = Object.values(notify.channels).some((c) => c.enabled && c.type === 'mqtt');
  if (wantsMqtt && mqttSource) out.notifyMqtt = await auxMqtt(ctx, mqttSource, 'notify');
  return out;
}

/**
 * Step 2: alert delivery, a durable outbox in the data folder, fed from the record bus. Without a `notify:`
 * section the default is one dashboard channel, so `reefd alerts list|ack` always has an outbox to read.
 */
export async function buildNotifier(ctx: StartContext, clients: Clients): Promise<Notifier> {
  const notify = ctx.config.notify;
  const channels = await channelsFromConfig(notify, {
    site: ctx.config.site,
    env: ctx.env,
    baseDir: ctx.baseDir,
    ...(clients.notifyMqtt ? { mqtt: clients.notifyMqtt } : {}),
    dashboard: (m) => ctx.notices.publish(m),
  });
  const logger = ctx.logger.child({ component: 'notifier' });
  const notifier = createNotifier({
    dir: alertsStateDir(ctx.dataDir),
    site: ctx.config.site,
    channels,
    ...notifierOptionsFromConfig(notify),
    onError: (err, channelId) =>
      logger.warn({ channel: channelId, ...errFields(err) }, 'notification failed; retrying'),
  });
  await notifier.start();
  const enqueue = (r: DerivedRecord) =>
    notifier
      .enqueue(r as never)
      .catch((err: unknown) =>
        logger.error(
          { ...errFields(err), rule: (r as { rule?: string }).rule },
          'alert not queued for notification',
        ),
      );
  const unsubscribe = ctx.bus.subscribe((records) => {
    for (const r of records) if (r.type === 'alert') void enqueue(r);
  });
  return ctx.life.add('notifier', notifier, async (n) => {
    unsubscribe();
    await n.stop();
  });
}

export interface Outputs {
  sinks: RecordSink[];
  deadLetter: DeadLetterSink;
}

/** Step 5: the record outputs, each writing every stream position once, and the dead-letter output. */
export async function buildOutputs(ctx: StartContext, clients: Clients, epoch: string): Promise<Outputs> {
  const { config } = ctx;
  const logger = ctx.logger.child({ component: 'outputs' });
  const authSince = new Map<string, number>();
  const sinks = await createOutputs({
    config,
    baseDir: ctx.baseDir,
    dataDir: ctx.dataDir,
    env: ctx.env,
    logger,
    stream: { epoch },
    onSpoolNearLimit: (sink, bytes, max) => {
      logger.warn(
        { sink, spoolBytes: bytes, maxBytes: max, code: 'REEFD_SPOOL_NEAR_LIMIT' },
        'spool near its bound',
      );
      ctx.bus.publish([
        operationalAlert({
          site: config.site,
          rule: 'spool_near_limit',
          value: bytes,
          limit: max,
          sensor: sink,
          nowMs: ctx.clock(),
        }),
      ]);
    },
    onAuth: (sink, failing) => {
      const now = ctx.clock();
      const raisedAt = authSince.get(sink);
      if (failing) authSince.set(sink, now);
      else authSince.delete(sink);
      const alert = operationalAlert({
        site: config.site,
        rule: 'output_auth',
        state: failing ? 'raised' : 'cleared',
        value: null,
        limit: null,
        sensor: sink,
        nowMs: now,
        ...(raisedAt !== undefined && !failing ? { raisedAtMs: raisedAt } : {}),
      });
      ctx.bus.publish([alert]);
    },
  });
  ctx.life.add('record outputs', sinks, (s) => Promise.allSettled(s.map((x) => x.close())));
  const dl = config.outputs.dead_letter;
  const deadLetter = await createDeadLetterSink({
    path: path.resolve(ctx.baseDir, dl.path ?? path.join(ctx.dataDir, 'dead-letter.ndjson')),
    ...(clients.deadLetterMqtt ? { mqtt: clients.deadLetterMqtt } : {}),
    ...(clients.deadLetterKafka ? { kafka: clients.deadLetterKafka } : {}),
    maxPerMin: dl.max_per_min,
    clock: ctx.clock,
    logger,
  });
  ctx.life.add('dead letters', deadLetter, (d) => d.close());
  return { sinks, deadLetter };
}

/** Step 9: the sources, started last; they push into the intake. Stopping them is the first step of a stop. */
export async function buildSources(ctx: StartContext, push: (input: RawInput) => void): Promise<Source[]> {
  const { config } = ctx;
  const logger = ctx.logger.child({ component: 'sources' });
  const sources: Source[] = [];
  const src = config.sources;
  if (src?.mqtt) {
    const m = src.mqtt;
    sources.push(
      createMqttSource({
        url: m.url,
        clientId: m.client_id,
        username: m.username,
        password: await ctx.secret(m.password),
        tls: tlsFiles(ctx.baseDir, m.tls),
        cleanStart: m.clean_start,
        sessionExpiryS: m.session_expiry_s,
        topicPrefix: config.topic_prefix,
        site: config.site,
        logger,
        protocolVersion: ctx.mqttProtocolVersion,
      }),
    );
  }
  if (src?.kafka) {
    const k = src.kafka;
    sources.push(
      createKafkaSource({
        brokers: k.brokers,
        clientId: k.client_id,
        groupId: k.group_id,
        topic: k.topic,
        topicPrefix: config.topic_prefix,
        tls: tlsFiles(ctx.baseDir, k.tls),
        sasl: await resolveSasl({ env: ctx.env, baseDir: ctx.baseDir }, k.sasl),
        logger,
      }),
    );
  }
  for (const s of sources) {
    ctx.life.add(`source ${s.name}`, s, (x) => x.stop());
    await s.start(push);
  }
  return sources;
}

/** Step 10: systemd readiness and watchdog (nothing outside systemd). The first to stop: STOPPING=1. */
export function buildSystemd(ctx: StartContext): void {
  const systemd = createSystemdNotifier(process.env);
  let lastBeat = Date.now();
  const beat = setInterval(() => (lastBeat = Date.now()), 1000);
  beat.unref();
  systemd.startWatchdog(() => Date.now() - lastBeat < 10_000);
  systemd.ready();
  ctx.life.add('systemd', systemd, (s) => {
    clearInterval(beat);
    s.stopping();
    s.close();
  });
}
