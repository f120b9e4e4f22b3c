// The intake, in the order of the picture in DEVELOPERS.md:
//   decode and parse once -> validate -> archive (durable) -> processor -> sinks and bus -> acknowledge.
// A message reaches the processor only once its archive line is fsync'd, and messages reach it in the order
// of their lines in the archive, so a restart that feeds the archive tail again (resume.ts) repeats exactly
// what the live run did: the same records, numbered with the same stream positions (cursor.ts), which the
// sinks use to skip what they already hold. The processor is one async call (ProcessorStep), so it may run
// elsewhere (a worker fed by a bounded queue) without changing this order.
import type { DerivedRecord, ReefdConfig, SensorMessage } from '../../libs/contract/index.js';
import type { PushResult } from '../../libs/processor/index.js';
import type { Logger } from '../log/logger.js';
import type { ArchiveWriter, DeadLetterSink, RawInput, RecordSink } from '../pipeline/types.js';
import type { RecordBus } from './bus.js';
import { advance, type StreamState } from './cursor.js';
import { decode, redeliveryKey, type Decoded } from './decode.js';
import type { DaemonMetrics } from './metrics.js';
import { operationalAlert } from './operational.js';

export { redeliveryKey, archivedKey } from './decode.js';

/** The processor as the pipeline calls it: one message in, its result out, one call at a time. */
export interface ProcessorStep {
  push(message: SensorMessage, rxMs: number): Promise<PushResult>;
}

export interface PipelineOptions {
  config: ReefdConfig;
  step: ProcessorStep;
  archive: ArchiveWriter;
  sinks: readonly RecordSink[];
  /** The stream the checkpoint covers; the pipeline moves its cursor and positions forward. */
  stream: StreamState;
  deadLetter?: DeadLetterSink;
  metrics?: DaemonMetrics;
  logger?: Logger;
  /** Live records and operational alerts go here (dashboard, notifier); resumed records do not. */
  bus?: RecordBus;
  /** Called when the archive refuses a write (disk full): the message is not acknowledged. */
  onArchiveError?: (err: Error) => void;
  /** Called for every live message accepted and archived (the site's dead-man, silence.ts); never in resume. */
  onAccepted?: (rxMs: number) => void;
  /** Archive attempts on a full disk before the message is left to the broker (default 125, ~10 min). */
  archiveRetries?: number;
  /**
   * Messages sent to the step before the first of them has its result (default 1). A step in a worker thread
   * answers in order, so a window keeps it busy across the round trips; results, sinks and acknowledgements
   * still go in archive order, and a checkpoint waits until the window is empty.
   */
  stepWindow?: number;
  clock?: () => number;
}

export interface PipelineStats {
  received: number;
  accepted: number;
  rejected: number;
  rejectsByReason: Record<string, number>;
  recordsByType: Record<string, number>;
  archiveErrors: number;
  /** Redeliveries of messages already archived: acknowledged, not archived or processed again. */
  redeliveries: number;
  /** Messages whose `seq` started again (logger reboots). */
  sensorReboots: number;
  processorErrors: number;
}

export interface Pipeline {
  handle(input: RawInput): Promise<void>;
  /** One archive line read back at a restart: through the processor to the sinks (not the bus). */
  deliverArchived(message: SensorMessage | undefined, rxMs: number): Promise<void>;
  /** Marks messages as already archived (by redelivery key), e.g. the archive tail read at a restart. */
  rememberArchived(keys: Iterable<string>): void;
  /**
   * Runs `take` between two processor steps, so processor state and stream cursor agree (checkpoints). An
   * async `take` holds the processor until it resolves; the intake keeps archiving meanwhile.
   */
  atRest<T>(take: () => T | Promise<T>): Promise<T>;
  /** Resolves once every message handed to handle() so far is processed or given up. */
  drain(): Promise<void>;
  stats(): PipelineStats;
}

const MAX_DEAD_LETTER_PAYLOAD = 4096;
/** How many recent messages are remembered to recognise redeliveries (a broker resends its in-flight window). */
const REDELIVERY_MEMORY = 50_000;

interface Remembered {
  /** True once the message's line is durable; false when archiving it was given up. */
  durable: Promise<boolean>;
}

/** A line at the processor step: its result comes back in the order sent. */
interface InFlight {
  item: Ready;
  result: Promise<PushResult | undefined>;
}

/** A message whose line is durable, waiting for the processor. */
interface Ready {
  d: Decoded;
  input: RawInput;
  rxMs: number;
  settle: () => void;
  endTimer: (() => void) | undefined;
}

export function createPipeline(o: PipelineOptions): Pipeline {
  const stats: PipelineStats = {
    received: 0,
    accepted: 0,
    rejected: 0,
    rejectsByReason: {},
    recordsByType: {},
    archiveErrors: 0,
    redeliveries: 0,
    sensorReboots: 0,
    processorErrors: 0,
  };
  const clock = o.clock ?? Date.now;
  const retries = o.archiveRetries ?? 125;
  const stepWindow = Math.max(1, o.stepWindow ?? 1);
  const recent = new Map<string, Remembered>();
  const remember = (key: string, r: Remembered) => {
    recent.delete(key);
    recent.set(key, r);
    if (recent.size > REDELIVERY_MEMORY) recent.delete(recent.keys().next().value as string);
  };
  // Receive times in the archive never go backwards (cursor.ts): a line is stamped at least the last one.
  let lastRxMs = o.stream.cursor.rxMs ?? Number.NEGATIVE_INFINITY;
  let pending = 0;
  const drained: (() => void)[] = [];
  const ready: Ready[] = [];
  const rests: (() => Promise<void>)[] = [];
  let running = false;
  let wake: (() => void) | undefined;

  function countRecords(records: readonly DerivedRecord[]): void {
    for (const r of records) {
      stats.recordsByType[r.type] = (stats.recordsByType[r.type] ?? 0) + 1;
      o.metrics?.recordsOut.inc({ type: r.type });
    }
  }

  /** The processor's result for one archived line (the cursor moves past it); never rejects. */
  function dispatch(message: SensorMessage | undefined, rxMs: number): Promise<PushResult | undefined> {
    advance(o.stream.cursor, rxMs);
    if (message === undefined) return Promise.resolve(undefined);
    // A defect in a derivation must not stop the intake: the message is archived, a replay can derive it.
    const failed = (err: unknown): undefined => {
      stats.processorErrors++;
      o.logger?.error(
        { err, topic: `${message.station}/${message.sensor}` },
        'processor failed on a message',
      );
      return undefined;
    };
    try {
      return o.step.push(message, rxMs).catch(failed);
    } catch (err) {
      return Promise.resolve(failed(err));
    }
  }

  /** The records of a result to the sinks, numbered with the next stream positions (in archive order). */
  function emit(r: PushResult | undefined): PushResult | undefined {
    if (r !== undefined && r.records.length > 0) {
      const first = o.stream.nextPos;
      o.stream.nextPos += r.records.length;
      countRecords(r.records);
      for (const s of o.sinks) s.write(r.records, first);
    }
    return r;
  }

  /** Processor and sinks for one archived line, live or resumed; returns the records. */
  async function derive(message: SensorMessage | undefined, rxMs: number): Promise<PushResult | undefined> {
    return emit(await dispatch(message, rxMs));
  }

  const acceptedOf = (d: Decoded): SensorMessage | undefined =>
    d.reason === undefined && d.parse.ok ? d.parse.message : undefined;

  /** Sends a ready line to the step; its result is finished by finishLive, in the same order. */
  function startLive(item: Ready): InFlight {
    const accepted = acceptedOf(item.d);
    if (accepted === undefined) deadLetter(item.d, item.rxMs);
    return { item, result: dispatch(accepted, item.rxMs) };
  }

  async function finishLive({ item, result }: InFlight): Promise<void> {
    const { d, input, rxMs } = item;
    const accepted = acceptedOf(d);
    const r = emit(await result);
    if (accepted !== undefined) o.onAccepted?.(rxMs);
    if (accepted !== undefined && r !== undefined) {
      if (r.status === 'duplicate') o.metrics?.duplicates.inc();
      if (r.late) o.metrics?.late.inc();
      o.metrics?.lagSeconds.set((rxMs - accepted.tMs) / 1000);
      if (r.records.length > 0) o.bus?.publish(r.records);
      if (r.seqRestart === true) sensorRebooted(accepted);
    }
    item.endTimer?.();
    input.ack();
    item.settle();
  }

  function sensorRebooted(m: SensorMessage): void {
    stats.sensorReboots++;
    o.metrics?.sensorReboots.inc({ sensor: `${m.station}/${m.sensor}` });
    o.logger?.warn(
      { station: m.station, sensor: m.sensor, seq: m.seq, code: 'REEFD_SENSOR_REBOOT' },
      'sensor seq started again (logger reboot); its data is kept',
    );
    o.bus?.publish([
      operationalAlert({
        site: o.config.site,
        rule: 'sensor_reboot',
        value: m.seq ?? null,
        limit: null,
        station: m.station,
        sensor: m.sensor,
        nowMs: clock(),
      }),
    ]);
  }

  function deadLetter(d: Decoded, rxMs: number): void {
    const code = d.reason ?? 'invalid';
    stats.rejected++;
    const short = code.split(':')[0] ?? code;
    stats.rejectsByReason[short] = (stats.rejectsByReason[short] ?? 0) + 1;
    o.metrics?.rejects.inc({ reason: short });
    o.deadLetter?.write({
      topic: d.topic,
      rxMs,
      reason: code,
      payload: d.text.length > MAX_DEAD_LETTER_PAYLOAD ? d.text.slice(0, MAX_DEAD_LETTER_PAYLOAD) : d.text,
    });
  }

  /**
   * The processing loop, in archive order: up to `stepWindow` lines at the step, finished oldest first;
   * checkpoints slip in when none is at the step.
   */
  async function run(): Promise<void> {
    if (running) return;
    running = true;
    const window: InFlight[] = [];
    try {
      for (;;) {
        if (rests.length > 0) {
          while (window.length > 0) await finishLive(window.shift() as InFlight);
          for (const rest of rests.splice(0)) await rest();
          continue;
        }
        const item = ready.shift();
        if (item !== undefined) window.push(startLive(item));
        if (window.length >= stepWindow) await finishLive(window.shift() as InFlight);
        else if (item === undefined) {
          const oldest = window[0];
          if (oldest === undefined) break;
          // Idle but for the window: finish the oldest when its result comes, or send more as lines arrive.
          const woken = new Promise<false>((r) => (wake = () => r(false)));
          const done = await Promise.race([oldest.result.then(() => true), woken]);
          wake = undefined;
          if (done) await finishLive(window.shift() as InFlight);
        }
      }
    } finally {
      running = false;
    }
  }

  /** A new line or a checkpoint for the loop: starts it, or wakes it where it waits on the window. */
  function kick(): void {
    wake?.();
    void run();
  }

  function archive(d: Decoded, input: RawInput, settle: () => void, durable: (ok: boolean) => void): void {
    const endTimer = o.metrics?.processSeconds.startTimer();
    let attempt = 0;
    const tryAppend = (): void => {
      const rxMs = Math.max(input.rxMs, lastRxMs);
      lastRxMs = rxMs;
      const line = { topic: d.topic, rxMs, payload: input.payload, json: d.json, reject: d.reason };
      o.archive.appendMessage(line).then(
        () => {
          // Appends resolve in file order, so `ready` is in archive order.
          durable(true);
          ready.push({ d, input, rxMs, settle, endTimer });
          kick();
        },
        (err: unknown) => {
          stats.archiveErrors++;
          if (attempt === 0)
            o.logger?.error({ err }, 'archive write failed; the message stays unacknowledged at the broker');
          o.onArchiveError?.(err as Error);
          // A full disk is retried (the broker does not redeliver an unacknowledged message on the same
          // connection, so giving up would leave it out of the archive until a reconnect). The messages
          // waiting here are bounded by the source's in-flight window (MQTT Receive Maximum).
          if ((err as { code?: string }).code !== 'REEFD_DISK_FULL' || attempt >= retries) {
            durable(false);
            settle();
            return;
          }
          const waitMs = Math.min(5000, 250 * 2 ** attempt++);
          setTimeout(tryAppend, waitMs);
        },
      );
    };
    tryAppend();
  }

  return {
    rememberArchived: (keys) => {
      for (const k of keys) remember(k, { durable: Promise.resolve(true) });
    },
    stats: () => structuredClone(stats),
    async handle(input) {
      const d = decode(input.topic, input.payload, o.config);
      const key = redeliveryKey(input.topic, d.canonical);
      // A redelivery of a message already archived (the broker resends what it had not seen acknowledged,
      // e.g. after its own restart) is acknowledged once the first copy is durable, and neither archived
      // nor processed again. If the first copy never became durable, this one is archived as new.
      // Only a delivery the source marks as repeated is compared: a sensor (or a flood) sending the same
      // bytes twice sent two messages, and the archive keeps both.
      const earlier = input.redelivered === true ? recent.get(key) : undefined;
      if (earlier !== undefined && (await earlier.durable)) {
        stats.redeliveries++;
        input.ack();
        return;
      }
      stats.received++;
      o.metrics?.messagesIn.inc({ kind: d.kind });
      if (d.reason === undefined) stats.accepted++;
      pending++;
      let markDurable: (ok: boolean) => void = () => undefined;
      remember(key, { durable: new Promise<boolean>((r) => (markDurable = r)) });
      await new Promise<void>((settled) => {
        archive(
          d,
          input,
          () => {
            settled();
            if (--pending === 0) for (const w of drained.splice(0)) w();
          },
          markDurable,
        );
      });
    },
    async deliverArchived(message, rxMs) {
      if (rxMs > lastRxMs) lastRxMs = rxMs;
      await derive(message, rxMs);
    },
    atRest(take) {
      // Started at once when the processor is idle (take begins before atRest returns), else after the step
      // in progress.
      return new Promise((resolve, reject) => {
        rests.push(async () => {
          try {
            resolve(await take());
          } catch (err) {
            reject(err as Error);
          }
        });
        kick();
      });
    },
    drain() {
      if (pending === 0) return Promise.resolve();
      return new Promise<void>((r) => drained.push(r));
    },
  };
}
