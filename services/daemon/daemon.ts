// The daemon: wires sources, archive, processor, sinks, dashboard and notifier, checkpoints the processor,
// and shuts down in order on SIGTERM (stop intake, flush, checkpoint) within 10 s.
import { mkdir } from 'node:fs/promises';
import path from 'node:path';
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import type { Processor } from '../../libs/processor/index.js';
import { createArchiveWriter, type RawArchiveWriter } from '../archive/index.js';
import type { Logger } from '../log/logger.js';
import { notifyConfigSchema } from '../../libs/alerts/index.js';
import {
  alertsStateDir,
  channelsFromConfig,
  createNotifier,
  notifierOptionsFromConfig,
  type NotificationMessage,
  type Notifier,
} from '../notifiers/index.js';
import type { DeadLetterSink, RecordSink, Source } from '../pipeline/types.js';
import mqtt from 'mqtt';
import {
  createDeadLetterSink,
  kafkaClient,
  kafkaPublisher,
  mqttPublisher,
  tlsOptions,
  type TopicPublisher,
} from '../sinks/index.js';
import { createKafkaSource, createMqttSource } from '../sources/index.js';
import { loadFieldFiles } from '../config/field-files.js';
import { edgeFromConfig } from '../scaleout/edge-from-config.js';
import { readCheckpoint, writeCheckpoint } from './checkpoint.js';
import { createMetrics, type DaemonMetrics } from './metrics.js';
import { createPipeline, type Pipeline } from './pipeline.js';
import { createOutputs, resolveSasl, secretResolver, tlsFiles } from './outputs.js';
import { replayArchiveTail } from './resume.js';
import { createSystemdNotifier } from './systemd.js';

/** The checkpoint: the processor state plus the receive time of the last message it covers. */
type Checkpointed = ReturnType<Processor['snapshot']> & { lastRxMs?: number };

export interface DaemonOptions {
  config: ReefdConfig;
  /** Folder that relative paths in the configuration are relative to. */
  baseDir: string;
  logger: Logger;
  env: Readonly<Record<string, string | undefined>>;
  /** MQTT protocol version for the source (5 for Mosquitto; the embedded demo broker speaks 4). */
  mqttProtocolVersion?: 4 | 5;
  /** Extra record consumers (the dashboard). */
  onRecords?: (records: readonly DerivedRecord[]) => void;
  checkpointEveryMs?: number;
  metrics?: DaemonMetrics;
}

export interface Daemon {
  readonly processor: Processor;
  readonly pipeline: Pipeline;
  readonly metrics: DaemonMetrics;
  readonly notifier: Notifier;
  /** Where the notifier's dashboard channel shows its notices (set once the dashboard is up). */
  setNoticeSink(sink: (m: NotificationMessage) => void): void;
  readonly dataDir: string;
  ready(): boolean;
  /** Everything the HTTP layer shows at /readyz. */
  status(): Record<string, unknown>;
  checkpoint(): Promise<void>;
  stop(reason?: string): Promise<void>;
}

export async function startDaemon(o: DaemonOptions): Promise<Daemon> {
  const { config, logger } = o;
  const dataDir = path.resolve(o.baseDir, config.data_dir);
  await mkdir(dataDir, { recursive: true });
  const secret = secretResolver({ env: o.env, baseDir: o.baseDir });
  const metrics = o.metrics ?? createMetrics();
  const checkpointFile = path.join(dataDir, 'checkpoint.json');

  const sasl = (x: Parameters<typeof resolveSasl>[1]) => resolveSasl({ env: o.env, baseDir: o.baseDir }, x);

  /** A second MQTT client on the source broker (dead letters, notifications), never the intake's own. */
  async function auxMqtt(m: NonNullable<NonNullable<ReefdConfig['sources']>['mqtt']>, role: string) {
    const password = await secret(m.password);
    return mqtt.connect(m.url, {
      clientId: `${m.client_id}-${role}`,
      protocolVersion: o.mqttProtocolVersion ?? 5,
      ...(m.username !== undefined ? { username: m.username } : {}),
      ...(password !== undefined ? { password } : {}),
      ...(tlsOptions(tlsFiles(o.baseDir, m.tls)) as Record<string, unknown>),
    });
  }

  // 1. The processor, resumed from its checkpoint.
  const cp = await readCheckpoint(checkpointFile);
  if (cp.warning) logger.warn({ code: cp.warning.code }, cp.warning.message);
  const saved = cp.state as Checkpointed | undefined;
  // Edge mode (config `bridge`): accepted messages are forwarded to Kafka; see deploy/SCALING.md.
  const { bridge, processor } = await edgeFromConfig({
    config,
    saved,
    // The calibration file and the field logbook beside the configuration, read at start-up.
    processorOptions: (await loadFieldFiles(o.baseDir, config)).options,
    dataDir,
    logger,
    secret,
    tls: (t) => tlsFiles(o.baseDir, t),
  });

  // 2. The raw archive, and the lines it holds that the checkpoint has not seen (a crash after the last
  //    checkpoint): they are fed to the processor again so the windows resume where they were.
  const archiveDir = path.resolve(o.baseDir, config.archive.dir ?? path.join(dataDir, 'archive'));
  const archive: RawArchiveWriter = await createArchiveWriter({
    dir: archiveDir,
    fsyncMs: config.archive.fsync_ms,
    retentionDays: config.archive.retention_days,
    clock: Date.now,
    logger,
  });

  // 3. Outputs.
  const sinks: RecordSink[] = await createOutputs({
    config,
    baseDir: o.baseDir,
    dataDir,
    env: o.env,
    logger,
    onSpoolNearLimit: (sink, bytes, max) => spoolNear(sink, bytes, max),
  });
  const out = config.outputs;
  // Dead letters: always a file; optionally an MQTT topic (a client of its own on the source broker) and a
  // Kafka topic (a producer on the output or source cluster).
  const dl = out.dead_letter;
  const closers: (() => Promise<unknown>)[] = [];
  let dlMqtt: { publisher: TopicPublisher; topic: string } | undefined;
  if (dl?.mqtt_topic && config.sources?.mqtt) {
    const client = await auxMqtt(config.sources.mqtt, 'deadletter');
    client.on('error', (err) => logger.warn({ err: err.message }, 'dead-letter mqtt client error'));
    closers.push(() => client.endAsync());
    dlMqtt = { publisher: mqttPublisher(client), topic: dl.mqtt_topic };
  }
  let dlKafka: { publisher: TopicPublisher; topic: string } | undefined;
  const kc = out.kafka ?? config.sources?.kafka;
  if (dl?.kafka_topic && kc) {
    const producer = kafkaClient({
      brokers: kc.brokers,
      clientId: `${kc.client_id}-deadletter`,
      tls: tlsFiles(o.baseDir, kc.tls),
      sasl: await sasl(kc.sasl),
      logger,
    }).producer();
    await producer
      .connect()
      .catch((err: unknown) =>
        logger.warn({ err: (err as Error).message }, 'dead-letter kafka producer not connected yet'),
      );
    closers.push(() => producer.disconnect());
    dlKafka = { publisher: kafkaPublisher(producer), topic: dl.kafka_topic };
  }
  const deadLetter: DeadLetterSink = await createDeadLetterSink({
    path: path.resolve(o.baseDir, dl?.path ?? path.join(dataDir, 'dead-letter.ndjson')),
    ...(dlMqtt ? { mqtt: dlMqtt } : {}),
    ...(dlKafka ? { kafka: dlKafka } : {}),
    maxPerMin: dl?.max_per_min ?? 600,
    clock: Date.now,
    logger,
  });

  // 4. Alert delivery: a durable outbox in the data folder. Without a `notify:` section the default is one
  //    dashboard channel, so `reefd alerts list|ack` always has an outbox to read.
  const notifyConfig = config.notify ?? notifyConfigSchema.parse({});
  let noticeSink: ((m: NotificationMessage) => void) | undefined;
  let notifyClient: mqtt.MqttClient | undefined;
  const wantsMqtt = Object.values(notifyConfig.channels).some((c) => c.enabled && c.type === 'mqtt');
  if (wantsMqtt && config.sources?.mqtt) {
    notifyClient = await auxMqtt(config.sources.mqtt, 'notify');
    notifyClient.on('error', (err) => logger.warn({ err: err.message }, 'notification mqtt client error'));
  }
  const channels = await channelsFromConfig(notifyConfig, {
    site: config.site,
    env: o.env,
    ...(notifyClient ? { mqtt: notifyClient } : {}),
    dashboard: (m) => noticeSink?.(m),
  });
  const notifier: Notifier = createNotifier({
    dir: alertsStateDir(dataDir),
    site: config.site,
    channels,
    ...notifierOptionsFromConfig(notifyConfig),
    onError: (err, channelId) =>
      logger.warn({ channel: channelId, err: (err as Error).message }, 'notification failed; retrying'),
  });
  await notifier.start();
  const enqueue = (r: DerivedRecord) =>
    notifier
      .enqueue(r as never)
      .catch((err: unknown) =>
        logger.error(
          { err: (err as Error).message, rule: (r as { rule?: string }).rule },
          'alert not queued for notification',
        ),
      );

  function spoolNear(sink: string, bytes: number, max: number) {
    logger.warn(
      { sink, spoolBytes: bytes, maxBytes: max, code: 'REEFD_SPOOL_NEAR_LIMIT' },
      'spool near its bound',
    );
    const alert = operationalAlert('spool_near_limit', bytes, max, sink);
    o.onRecords?.([alert]);
    void enqueue(alert);
  }

  function operationalAlert(rule: string, value: number, limit: number, sensor?: string): DerivedRecord {
    return {
      type: 'alert',
      site: config.site,
      t: new Date().toISOString(),
      rule: `reefd.${rule}`,
      class: 'fault',
      state: 'raised',
      value,
      limit,
      ...(sensor !== undefined ? { sensor } : {}),
      severity: 'critical',
      id: `reefd.${rule}.${Date.now()}`,
    } as DerivedRecord;
  }

  let diskFullSince = 0;
  const pipeline = createPipeline({
    config,
    processor,
    archive,
    sinks,
    deadLetter,
    metrics,
    logger,
    onRecords: (records) => {
      o.onRecords?.(records);
      for (const r of records) if (r.type === 'alert') void enqueue(r);
    },
    onArchiveError: (err) => {
      if ((err as { code?: string }).code === 'REEFD_DISK_FULL' && Date.now() - diskFullSince > 10 * 60_000) {
        diskFullSince = Date.now();
        const a = operationalAlert('disk_full', 0, 0);
        o.onRecords?.([a]);
        void enqueue(a);
      }
    },
  });

  const resumed = await replayArchiveTail(archiveDir, saved?.lastRxMs, config, processor);
  pipeline.rememberArchived(resumed.keys);
  if (resumed.lines > 0) {
    logger.info(
      { lines: resumed.lines, records: resumed.records.length },
      'resumed the windows from the archive tail',
    );
    for (const s of sinks) s.write(resumed.records);
  }
  let lastRxMs = resumed.lastRxMs;

  // 5. Sources.
  const sources: Source[] = [];
  const src = config.sources;
  if (src?.mqtt) {
    const m = src.mqtt;
    sources.push(
      createMqttSource({
        url: m.url,
        clientId: m.client_id,
        username: m.username,
        password: await secret(m.password),
        tls: tlsFiles(o.baseDir, m.tls),
        cleanStart: m.clean_start,
        sessionExpiryS: m.session_expiry_s,
        topicPrefix: config.topic_prefix,
        site: config.site,
        logger,
        ...(o.mqttProtocolVersion !== undefined ? { protocolVersion: o.mqttProtocolVersion } : {}),
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
        tls: tlsFiles(o.baseDir, k.tls),
        sasl: await sasl(k.sasl),
        logger,
      }),
    );
  }

  const push = (input: Parameters<Pipeline['handle']>[0]) => {
    if (lastRxMs === undefined || input.rxMs > lastRxMs) lastRxMs = input.rxMs;
    void pipeline.handle(input);
  };
  for (const s of sources) await s.start(push);

  const systemd = createSystemdNotifier(process.env);
  let lastBeat = Date.now();
  const beat = setInterval(() => (lastBeat = Date.now()), 1000);
  beat.unref();
  systemd.startWatchdog(() => Date.now() - lastBeat < 10_000);
  systemd.ready();

  async function checkpoint(settleMs = 20_000): Promise<void> {
    // The state and the receive time it covers are taken first; then everything they cover is made durable
    // before the checkpoint may claim it: the archive lines (the cursor counts appended lines), the bridge
    // (edge mode: at the broker or in its disk spool) and the records the sinks still hold in memory
    // (delivered or spooled). Without the sinks' flush a kill -9 just after a checkpoint lost the records of
    // covered messages, since resume does not feed those again (fault case a, kill after a checkpoint).
    // If the sinks do not settle within settleMs (a hung or very slow database), the previous checkpoint
    // stays: resume then feeds more lines again, never fewer.
    const covered = lastRxMs;
    const state: Checkpointed = processor.snapshot();
    await archive.flush();
    await bridge?.flush();
    let timer: NodeJS.Timeout | undefined;
    const settled = await Promise.race([
      Promise.all(sinks.map((s) => s.flush())).then(() => true),
      new Promise<boolean>((r) => (timer = setTimeout(() => r(false), settleMs))),
    ]);
    clearTimeout(timer);
    if (!settled) {
      logger.warn(
        { code: 'REEFD_CHECKPOINT_DEFERRED' },
        'sinks did not settle in time; checkpoint kept as it was',
      );
      return;
    }
    if (covered !== undefined) state.lastRxMs = covered;
    await writeCheckpoint(checkpointFile, state);
  }
  const cpTimer = setInterval(() => {
    checkpoint().catch((err: unknown) => logger.error({ err: (err as Error).message }, 'checkpoint failed'));
  }, o.checkpointEveryMs ?? 30_000);
  cpTimer.unref();
  const spoolTimer = setInterval(() => {
    for (const s of sinks) metrics.spoolBytes.set({ sink: s.name }, s.stats().spoolBytes ?? 0);
  }, 5000);
  spoolTimer.unref();

  let stopping: Promise<void> | undefined;
  async function stop(reason = 'stop'): Promise<void> {
    stopping ??= (async () => {
      logger.info({ reason }, 'stopping: intake first, then flush and checkpoint');
      systemd.stopping();
      clearInterval(cpTimer);
      clearInterval(spoolTimer);
      clearInterval(beat);
      await Promise.allSettled(sources.map((s) => s.stop()));
      const deadline = new Promise<void>((r) => setTimeout(r, 7000).unref());
      await Promise.race([
        Promise.allSettled([
          archive.flush(),
          ...sinks.map((s) => s.flush()),
          deadLetter.flush(),
          bridge?.flush(),
        ]),
        deadline,
      ]);
      try {
        // The sinks had their flush above: a second chance of 1 s keeps the exit within 10 s.
        await checkpoint(1000);
      } catch (err) {
        logger.error({ err: (err as Error).message }, 'final checkpoint failed');
      }
      await Promise.race([
        Promise.allSettled([
          ...sinks.map((s) => s.close()),
          bridge?.close(),
          deadLetter.close(),
          archive.close(),
          notifier.stop(),
          notifyClient?.endAsync(),
        ]),
        deadline,
      ]);
      systemd.close();
      logger.info({ stats: pipeline.stats() }, 'stopped');
    })();
    return stopping;
  }

  return {
    processor,
    pipeline,
    metrics,
    notifier,
    setNoticeSink: (sink) => {
      noticeSink = sink;
    },
    dataDir,
    ready: () => sources.every((s) => s.connected()),
    status: () => ({
      sources: Object.fromEntries(sources.map((s) => [s.name, s.connected()])),
      sinks: Object.fromEntries(sinks.map((s) => [s.name, s.stats()])),
      watermark: new Date(processor.watermarkMs()).toISOString(),
      pipeline: pipeline.stats(),
      ...(bridge ? { bridge: bridge.stats() } : {}),
    }),
    checkpoint,
    stop,
  };
}
