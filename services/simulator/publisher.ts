// Publishes the simulated reef to an MQTT broker in (optionally accelerated) real time, and writes the
// truth beside it as NDJSON. The model is libs/simulator; this file owns the clock, the socket and the file.
import { createWriteStream, type WriteStream } from 'node:fs';
import { once } from 'node:events';
import mqtt, { type MqttClient } from 'mqtt';
import type { ReefdConfig } from '../../libs/contract/index.js';
import { simulate, type SimEvent } from '../../libs/simulator/index.js';
import type { Logger } from '../log/logger.js';

export interface PublishOptions {
  config: ReefdConfig;
  brokerUrl: string;
  /** Simulated seconds per wall second, or 'max' for as fast as the broker takes them. */
  speed: number | 'max';
  seed: number;
  startMs: number;
  durationMs: number;
  truthPath?: string;
  /** Never send a message before the wall clock reaches its time: a run that starts in the past plays
   * at `speed` until it catches up with now, then in real time, as one continuous simulation. */
  notAheadOfWallClock?: boolean;
  logger: Pick<Logger, 'info' | 'warn' | 'error' | 'debug'>;
  signal?: AbortSignal;
  /** Injected for tests: the wall clock (ms) and a sleep. */
  now?: () => number;
  sleep?: (ms: number, signal?: AbortSignal) => Promise<void>;
}

export interface PublishSummary {
  messages: number;
  truthRows: number;
  lastTMs: number;
  aborted: boolean;
}

const defaultSleep = (ms: number, signal?: AbortSignal) =>
  new Promise<void>((resolve) => {
    if (signal?.aborted) return resolve();
    const t = setTimeout(done, ms);
    function done() {
      signal?.removeEventListener('abort', done);
      clearTimeout(t);
      resolve();
    }
    signal?.addEventListener('abort', done, { once: true });
  });

async function writeLine(out: WriteStream, line: string): Promise<void> {
  if (!out.write(line)) await once(out, 'drain');
}

/** Connects, publishes the run, disconnects. Resolves with counts; rejects if the broker is unreachable. */
export async function publishSimulation(opts: PublishOptions): Promise<PublishSummary> {
  const now = opts.now ?? Date.now;
  const sleep = opts.sleep ?? defaultSleep;
  // No retries for the first connection, so a wrong URL fails at once; later drops reconnect every second.
  const client: MqttClient = await mqtt.connectAsync(
    opts.brokerUrl,
    {
      clientId: `reefd-sim-${opts.seed}-${process.pid}`,
      clean: true,
      reconnectPeriod: 1000,
      connectTimeout: 10_000,
      protocolVersion: 4, // MQTT 3.1.1: understood by the embedded demo broker and by Mosquitto
    },
    false,
  );
  const truth = opts.truthPath ? createWriteStream(opts.truthPath, { flags: 'w' }) : undefined;
  const summary: PublishSummary = { messages: 0, truthRows: 0, lastTMs: opts.startMs, aborted: false };
  const wallStart = now();
  opts.logger.info(
    {
      broker: opts.brokerUrl,
      speed: opts.speed,
      seed: opts.seed,
      start: new Date(opts.startMs).toISOString(),
    },
    'simulator publishing',
  );
  try {
    const run: Generator<SimEvent> = simulate(opts.config, {
      startMs: opts.startMs,
      durationMs: opts.durationMs,
      seed: opts.seed,
    });
    for (const ev of run) {
      if (opts.signal?.aborted) {
        summary.aborted = true;
        break;
      }
      if (ev.type === 'truth') {
        if (truth) await writeLine(truth, JSON.stringify(ev.row) + '\n');
        summary.truthRows++;
        continue;
      }
      const m = ev.message;
      if (opts.speed !== 'max' || opts.notAheadOfWallClock) {
        let due = opts.speed === 'max' ? 0 : wallStart + (m.tMs - opts.startMs) / opts.speed;
        if (opts.notAheadOfWallClock) due = Math.max(due, m.tMs);
        const wait = due - now();
        if (wait > 0) await sleep(wait, opts.signal);
        if (opts.signal?.aborted) {
          summary.aborted = true;
          break;
        }
      }
      // QoS 1: the broker acknowledges each message, which also paces a --speed max run to the broker.
      await client.publishAsync(m.topic, JSON.stringify(m.payload), { qos: 1 });
      summary.messages++;
      summary.lastTMs = m.tMs;
      if (summary.messages % 1000 === 0) {
        opts.logger.debug(
          { messages: summary.messages, t: new Date(m.tMs).toISOString() },
          'simulator progress',
        );
      }
    }
  } finally {
    if (truth) {
      truth.end();
      await once(truth, 'close');
    }
    await client.endAsync();
  }
  opts.logger.info({ ...summary, last: new Date(summary.lastTMs).toISOString() }, 'simulator done');
  return summary;
}
