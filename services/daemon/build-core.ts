// The daemon's start-up steps around its state: the processor resumed from its checkpoint, the raw archive,
// the intake pipeline fed with the archive tail, and the checkpointer. Each registers how to close it.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { ReefdConfig } from '../../libs/contract/index.js';
import type { SiteSilenceState } from '../../libs/alerts/index.js';
import type { Processor } from '../../libs/processor/index.js';
import { createArchiveWriter, type RawArchiveWriter } from '../archive/index.js';
import { packageRoot } from '../paths.js';
import type { EdgeBridge } from '../scaleout/edge-bridge.js';
import { edgeFromConfig } from '../scaleout/edge-from-config.js';
import { loadFieldFiles } from '../config/field-files.js';
import type { Outputs } from './build-io.js';
import { checkpointPieces, readCheckpoint, writeCheckpoint, writeFileAtomic } from './checkpoint.js';
import type { StartContext } from './context.js';
import { newStream, renewEpoch, streamFingerprint, type StreamState } from './cursor.js';
import { tlsFiles } from './outputs.js';
import { operationalAlert } from './operational.js';
import { createPipeline, type Pipeline } from './pipeline.js';
import { resumeFromArchive } from './resume.js';
import type { SilenceWatch } from './silence.js';
import { errFields } from '../log/logger.js';
import { startProcessorWorker, type ProcessorWorker } from './worker-processor.js';

/**
 * Messages at the processor's worker before the first has its result: enough to keep it busy across the
 * round trips, far below the broker's in-flight window (1,000), which still bounds the queue before it.
 */
const WORKER_STEP_WINDOW = 64;

export interface CoreState {
  /** In-process, or the HTTP side's view of the worker's. */
  processor: Processor;
  /** The processor's worker thread, when the daemon runs the processor there (StartContext.processorWorker). */
  worker?: ProcessorWorker;
  bridge: EdgeBridge | undefined;
  /** The stream the processor's state covers; the pipeline moves it forward. */
  stream: StreamState;
  checkpointFile: string;
  /** The dead-man's state from the checkpoint, if it had one of the expected shape. */
  savedSilence: SiteSilenceState | undefined;
}

function parseSilence(v: unknown): SiteSilenceState | undefined {
  const s = v as Partial<SiteSilenceState> | undefined;
  return s?.v === 1 &&
    typeof s.site === 'string' &&
    typeof s.lastMs === 'number' &&
    (s.raisedAtMs === null || typeof s.raisedAtMs === 'number')
    ? (s as SiteSilenceState)
    : undefined;
}

function packageVersion(): string {
  try {
    return (JSON.parse(readFileSync(path.join(packageRoot(), 'package.json'), 'utf8')) as { version: string })
      .version;
  } catch {
    return 'unknown';
  }
}

/** The parts of the configuration the records depend on (outputs, sources and folders do not count). */
function derivationConfig(c: ReefdConfig): unknown {
  const { sources: _s, outputs: _o, archive: _a, data_dir: _d, http: _h, notify: _n, ...rest } = c;
  return rest;
}

/**
 * Step 3: the processor, resumed from its checkpoint, and the stream it covers. A data folder without a
 * checkpoint starts a new stream, and a configuration or version other than the checkpoint's a new epoch;
 * either is written at once, so a crash before the first periodic checkpoint resumes the same stream.
 */
export async function buildState(ctx: StartContext): Promise<CoreState> {
  const { config } = ctx;
  const logger = ctx.logger.child({ component: 'state' });
  const checkpointFile = path.join(ctx.dataDir, 'checkpoint.json');
  const cp = await readCheckpoint(checkpointFile);
  if (cp.warning) logger.warn({ code: cp.warning.code }, cp.warning.message);
  // The calibration file and the field log change records like the configuration does (read at start-up).
  const fieldFiles = await loadFieldFiles(ctx.baseDir, config);
  const fingerprint = streamFingerprint(
    { config: derivationConfig(config), calibration: fieldFiles.calibration, logbook: fieldFiles.logbook },
    packageVersion(),
  );
  let stream = cp.stream;
  let fresh = false;
  if (stream === undefined) {
    stream = newStream(fingerprint);
    // An earlier version's checkpoint: lines from its receive time on are fed again (the processor drops
    // the ones it had seen as duplicates).
    if (cp.legacyRxMs !== undefined) stream.cursor = { rxMs: cp.legacyRxMs, atRx: 0, lines: 0 };
    fresh = true;
  } else if (stream.fingerprint !== fingerprint) {
    logger.info(
      { epoch: stream.epoch },
      'configuration or version changed since the checkpoint: the record stream starts a new epoch',
    );
    stream = renewEpoch(stream, fingerprint);
    fresh = true;
  }
  const savedSilence = parseSilence(cp.silence);
  // The worker thread serves the plain derivation; edge mode keeps its bridge processor in-process.
  if (ctx.processorWorker && config.bridge === undefined) {
    const worker = ctx.life.add(
      'processor worker',
      await startProcessorWorker(config, cp.state, fieldFiles.options),
      (w) => w.close(),
    );
    if (fresh)
      await writeFileAtomic(
        checkpointFile,
        await worker.checkpoint({ savedAt: new Date().toISOString(), stream }),
      );
    return { processor: worker.processor, worker, bridge: undefined, stream, checkpointFile, savedSilence };
  }
  const { bridge, processor } = await edgeFromConfig({
    config,
    saved: cp.state,
    dataDir: ctx.dataDir,
    logger,
    secret: ctx.secret,
    tls: (t) => tlsFiles(ctx.baseDir, t),
    processorOptions: fieldFiles.options,
  });
  if (bridge !== undefined) ctx.life.add('edge bridge', bridge, (b) => b.close());
  if (fresh) await writeCheckpoint(checkpointFile, processor.snapshot(), stream);
  return { processor, bridge, stream, checkpointFile, savedSilence };
}

/** Step 4: the raw archive. */
export async function buildArchive(ctx: StartContext): Promise<{ writer: RawArchiveWriter; dir: string }> {
  const { config } = ctx;
  const dir = path.resolve(ctx.baseDir, config.archive.dir ?? path.join(ctx.dataDir, 'archive'));
  const writer = await createArchiveWriter({
    dir,
    fsyncMs: config.archive.fsync_ms,
    retentionDays: config.archive.retention_days,
    clock: ctx.clock,
    logger: ctx.logger.child({ component: 'archive' }),
  });
  ctx.life.add('raw archive', writer, (w) => w.close());
  return { writer, dir };
}

/**
 * Step 6: the intake pipeline, and the archive lines the checkpoint has not covered (a crash after the last
 * checkpoint) fed through its processor stage again, so the windows resume where they were and the
 * outputs receive what they had not.
 */
export async function buildPipeline(
  ctx: StartContext,
  state: CoreState,
  archive: { writer: RawArchiveWriter; dir: string },
  outputs: Outputs,
  silence: SilenceWatch,
): Promise<Pipeline> {
  const { config } = ctx;
  const logger = ctx.logger.child({ component: 'pipeline' });
  let diskFullAtMs = Number.NEGATIVE_INFINITY;
  const pipeline = createPipeline({
    config,
    step: state.worker?.step ?? { push: async (m, rxMs) => state.processor.push(m, rxMs) },
    stepWindow: state.worker === undefined ? 1 : WORKER_STEP_WINDOW,
    archive: archive.writer,
    sinks: outputs.sinks,
    stream: state.stream,
    deadLetter: outputs.deadLetter,
    metrics: ctx.metrics,
    logger,
    bus: ctx.bus,
    clock: ctx.clock,
    onAccepted: (rxMs) => silence.accepted(rxMs),
    onArchiveError: (err) => {
      const now = ctx.clock();
      if ((err as { code?: string }).code !== 'REEFD_DISK_FULL' || now - diskFullAtMs < 10 * 60_000) return;
      diskFullAtMs = now;
      ctx.bus.publish([
        operationalAlert({ site: config.site, rule: 'disk_full', value: null, limit: null, nowMs: now }),
      ]);
    },
  });
  const resumed = await resumeFromArchive(
    archive.dir,
    state.stream.cursor,
    config,
    pipeline,
    () => state.stream.nextPos,
  );
  pipeline.rememberArchived(resumed.keys);
  if (resumed.lines > 0)
    logger.info(
      { lines: resumed.lines, records: resumed.records, epoch: state.stream.epoch },
      'resumed the windows from the archive tail; outputs skip the records they hold',
    );
  return pipeline;
}

export interface Checkpointer {
  /** Writes a checkpoint once everything it covers is durable; keeps the old one if the outputs do not settle. */
  checkpoint(settleMs?: number): Promise<void>;
}

/**
 * Step 7: checkpoints every `everyMs`, and the last one at stop, after the intake has drained and the
 * archive, bridge, outputs and dead letters have flushed (bounded, so the process exits within 10 s).
 */
export function buildCheckpointer(
  ctx: StartContext,
  state: CoreState,
  pipeline: Pipeline,
  archive: RawArchiveWriter,
  outputs: Outputs,
  silence: SilenceWatch,
  everyMs: number,
): Checkpointer {
  const logger = ctx.logger.child({ component: 'checkpoint' });
  async function checkpoint(settleMs = 20_000): Promise<void> {
    // State and stream are taken together between two processor steps; then everything they cover is made
    // durable before the checkpoint may claim it: the bridge (edge mode) and the records the outputs still
    // hold in memory (delivered or spooled). Archive lines are durable before they are processed. If the
    // outputs do not settle within settleMs (a hung or very slow database), the previous checkpoint stays:
    // resume then feeds more lines again, and the outputs skip what they already hold.
    // In-process, the text is made from the live state while the pipeline holds the processor at rest (no
    // copy first); the event loop runs between its pieces, so the intake keeps archiving and the HTTP side
    // answers. With a worker, the request is sent at rest (the worker answers in order, so it sees exactly
    // the pushes before it) and the worker makes the JSON while the processor moves on here.
    const taken = await pipeline.atRest(async (): Promise<{ made: Promise<string[] | Uint8Array> }> => {
      const silenceNow = silence.snapshot();
      const worker = state.worker;
      if (worker === undefined) {
        const pieces = await checkpointPieces(state.processor.snapshot({ copy: false }), state.stream, {
          silence: silenceNow,
        });
        return { made: Promise.resolve(pieces) };
      }
      const head = { savedAt: new Date().toISOString(), stream: structuredClone(state.stream) };
      return { made: worker.checkpoint({ ...head, silence: silenceNow }) };
    });
    const content = await taken.made;
    await state.bridge?.flush();
    let timer: NodeJS.Timeout | undefined;
    const settled = await Promise.race([
      Promise.all(outputs.sinks.map((s) => s.flush())).then(() => true),
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
    await writeFileAtomic(state.checkpointFile, content);
  }
  const timer = setInterval(() => {
    checkpoint().catch((err: unknown) => logger.error(errFields(err), 'checkpoint failed'));
  }, everyMs);
  timer.unref();
  const spoolTimer = setInterval(() => {
    for (const s of outputs.sinks) {
      const st = s.stats();
      ctx.metrics.spoolBytes.set({ sink: s.name }, st.spoolBytes ?? 0);
      ctx.metrics.outputSkipped.set({ sink: s.name }, st.skipped ?? 0);
    }
  }, 1000);
  spoolTimer.unref();
  ctx.life.add('checkpointer', undefined, async () => {
    clearInterval(timer);
    clearInterval(spoolTimer);
    const deadline = new Promise<void>((r) => setTimeout(r, 7000).unref());
    await Promise.race([
      (async () => {
        await pipeline.drain();
        await Promise.allSettled([
          archive.flush(),
          ...outputs.sinks.map((s) => s.flush()),
          outputs.deadLetter.flush(),
          state.bridge?.flush(),
        ]);
      })(),
      deadline,
    ]);
    try {
      // The outputs had their flush above: a second chance of 1 s keeps the exit within 10 s.
      await checkpoint(1000);
    } catch (err) {
      logger.error(errFields(err), 'final checkpoint failed');
    }
  });
  return { checkpoint };
}
