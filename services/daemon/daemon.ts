// The daemon: a list of start-up steps called in order, each returning what it made and registering how to
// close it (lifecycle.ts). A start that fails at any step closes what it already started and throws; a stop
// closes everything in reverse: systemd told first, sources stopped, the intake drained, archive and
// outputs flushed, the last checkpoint written, then outputs, archive, notifier and clients closed, within
// 10 s. Records and operational alerts reach the dashboard and the notifier through one bus.
import { mkdir } from 'node:fs/promises';
import { ReefdError, type ReefdConfig } from '../../libs/contract/index.js';
import type { Processor } from '../../libs/processor/index.js';
import type { Logger } from '../log/logger.js';
import type { NotificationMessage, Notifier } from '../notifiers/index.js';
import type { Source } from '../pipeline/types.js';
import { buildArchive, buildCheckpointer, buildPipeline, buildState } from './build-core.js';
import { buildClients, buildNotifier, buildOutputs, buildSources, buildSystemd } from './build-io.js';
import { createBus, type Bus, type RecordBus } from './bus.js';
import type { StartContext } from './context.js';
import { resolveDataDir } from '../config/load.js';
import { Lifecycle } from './lifecycle.js';
import { ActiveAlerts, createMetrics, type DaemonMetrics } from './metrics.js';
import { secretResolver } from './outputs.js';
import { buildSilenceWatch } from './silence.js';
import type { Pipeline } from './pipeline.js';
import { errFields } from '../log/logger.js';

export type { RecordBus } from './bus.js';

export interface DaemonOptions {
  config: ReefdConfig;
  /** Folder that relative paths in the configuration are relative to. */
  baseDir: string;
  logger: Logger;
  env: Readonly<Record<string, string | undefined>>;
  /** MQTT protocol version for the source (5 for Mosquitto; the embedded demo broker speaks 4). */
  mqttProtocolVersion?: 4 | 5;
  checkpointEveryMs?: number;
  /**
   * Run the processor in a worker thread, off the intake's thread (default: the environment's
   * REEFD_PROCESSOR_WORKER=1; edge mode keeps it in-process).
   */
  processorWorker?: boolean;
  metrics?: DaemonMetrics;
  clock?: () => number;
}

export interface Daemon {
  readonly processor: Processor;
  readonly pipeline: Pipeline;
  readonly metrics: DaemonMetrics;
  readonly notifier: Notifier;
  /** Every batch of live records and every operational alert (dashboard, notifier subscribe here). */
  readonly bus: RecordBus;
  /** Notices of the notifier's dashboard channel (the dashboard's banner). */
  readonly notices: Bus<NotificationMessage>;
  readonly dataDir: string;
  ready(): boolean;
  /** Everything the HTTP layer shows at /readyz. */
  status(): Record<string, unknown>;
  checkpoint(): Promise<void>;
  stop(reason?: string): Promise<void>;
}

/** Budget for a stop (the command's own hard limit is 10 s). */
const STOP_DEADLINE_MS = 9000;

export async function startDaemon(o: DaemonOptions): Promise<Daemon> {
  const { config, logger } = o;
  if (
    config.sources === undefined ||
    (config.sources.mqtt === undefined && config.sources.kafka === undefined)
  )
    throw new ReefdError(
      'REEFD_NO_SOURCE',
      'the configuration has no sources: add sources.mqtt or sources.kafka (reefd replay needs none)',
    );
  const dataDir = resolveDataDir(config, o.baseDir, o.env);
  await mkdir(dataDir, { recursive: true });
  const life = new Lifecycle(logger);
  // Metrics made here are closed here, last of all; metrics handed in belong to the caller.
  const metrics = o.metrics ?? life.add('metrics', createMetrics(), (m) => m.close());
  const onBusError = (err: unknown) => logger.error(errFields(err), 'a record bus subscriber failed');
  const ctx: StartContext = {
    config,
    baseDir: o.baseDir,
    dataDir,
    logger,
    env: o.env,
    secret: secretResolver({ env: o.env, baseDir: o.baseDir }),
    metrics,
    bus: createBus(onBusError),
    notices: createBus(onBusError),
    life,
    clock: o.clock ?? Date.now,
    mqttProtocolVersion: o.mqttProtocolVersion ?? 5,
    processorWorker: o.processorWorker ?? o.env.REEFD_PROCESSOR_WORKER === '1',
  };
  // Unsubscribed (and the metrics' probes let go) once the parts are closed, on a stop or a failed start.
  let offAlerts: (() => void) | undefined;
  try {
    const clients = await buildClients(ctx);
    const notifier = await buildNotifier(ctx, clients);
    const state = await buildState(ctx);
    // Alerts raised and not cleared, for /metrics: those restored, then every alert record published.
    const activeAlerts = new ActiveAlerts();
    activeAlerts.seed(state.processor.activeAlerts());
    offAlerts = ctx.bus.subscribe((records) => activeAlerts.observe(records));
    const archive = await buildArchive(ctx);
    const outputs = await buildOutputs(ctx, clients, state.stream.epoch);
    // The site's wall-clock dead-man (`site_silent`): fed by the pipeline, writes to the outputs and the bus.
    const silence = buildSilenceWatch(ctx, outputs.sinks, state.savedSilence);
    const pipeline = await buildPipeline(ctx, state, archive, outputs, silence);
    const { checkpoint } = buildCheckpointer(
      ctx,
      state,
      pipeline,
      archive.writer,
      outputs,
      silence,
      o.checkpointEveryMs ?? 30_000,
    );
    const sources: Source[] = [];
    ctx.metrics.observe({
      nowMs: ctx.clock,
      sources: () => sources,
      sensors: () => state.processor.sensorHealth(),
      activeAlerts: () => activeAlerts.list(),
    });
    sources.push(...(await buildSources(ctx, (input) => void pipeline.handle(input))));
    buildSystemd(ctx);
    logger.info({ parts: life.names(), dataDir, epoch: state.stream.epoch }, 'reefd started');

    let stopping: Promise<void> | undefined;
    return {
      processor: state.processor,
      pipeline,
      metrics: ctx.metrics,
      notifier,
      bus: ctx.bus,
      notices: ctx.notices,
      dataDir,
      ready: () => sources.every((s) => s.connected()),
      status: () => ({
        sources: Object.fromEntries(sources.map((s) => [s.name, s.connected()])),
        sinks: Object.fromEntries(outputs.sinks.map((s) => [s.name, s.stats()])),
        watermark: new Date(state.processor.watermarkMs()).toISOString(),
        pipeline: pipeline.stats(),
        stream: {
          epoch: state.stream.epoch,
          nextPos: state.stream.nextPos,
          lines: state.stream.cursor.lines,
        },
        ...(state.bridge ? { bridge: state.bridge.stats() } : {}),
      }),
      checkpoint: () => checkpoint(),
      stop(reason = 'stop') {
        stopping ??= (async () => {
          logger.info({ reason }, 'stopping: intake first, then flush and checkpoint');
          await life.closeAll(STOP_DEADLINE_MS);
          ctx.metrics.observe(undefined);
          offAlerts?.();
          logger.info({ stats: pipeline.stats() }, 'stopped');
        })();
        return stopping;
      },
    };
  } catch (err) {
    logger.error({ ...errFields(err), parts: life.names() }, 'start failed; stopping what was started');
    await life.closeAll(5000);
    ctx.metrics.observe(undefined);
    offAlerts?.();
    throw err;
  }
}
