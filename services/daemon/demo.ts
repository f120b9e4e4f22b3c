// The built-in demo (`reefd run` with no config, `npm start`): an embedded broker on loopback, the simulated
// Ornen Reef publishing at an accelerated speed, the full pipeline writing to a local data folder, and the
// dashboard. The simulation starts a day in the past and runs fast until it catches up with the wall clock
// (sample times must not run ahead of the receive time: the timing test would reject them), then in real time.
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { parseConfigText, type ReefdConfig } from '../../libs/contract/index.js';
import { startEmbeddedBroker, type EmbeddedBroker } from '../broker/embedded.js';
import type { Logger } from '../log/logger.js';
import { packageRoot } from '../paths.js';
import { publishSimulation } from '../simulator/publisher.js';

export interface DemoSetup {
  config: ReefdConfig;
  broker: EmbeddedBroker;
  /** Starts publishing; resolves when the simulation ends or is aborted. */
  simulate(signal: AbortSignal): Promise<void>;
}

const HOUR = 3_600_000;

export async function prepareDemo(o: {
  logger: Logger;
  dataDir: string;
  speed: number;
  backfillHours: number;
  seed: number;
  httpPort: number;
}): Promise<DemoSetup> {
  const file = path.join(packageRoot(), 'deploy', 'demo', 'ornen-reef.yaml');
  const base = parseConfigText(await readFile(file, 'utf8'));
  if (!base.ok)
    throw new Error(`the demo configuration ${file} is invalid: ${JSON.stringify(base.problems)}`);
  const broker = await startEmbeddedBroker('127.0.0.1', 0);
  o.logger.info({ url: broker.url }, 'embedded MQTT broker listening (demo)');
  const raw = JSON.parse(JSON.stringify(base.config)) as Record<string, unknown>;
  const text = JSON.stringify({
    ...raw,
    data_dir: o.dataDir,
    sources: { mqtt: { url: broker.url, client_id: 'reefd-demo' } },
    outputs: { ndjson: { path: path.join(o.dataDir, 'records.ndjson') } },
    http: { host: '127.0.0.1', port: o.httpPort },
    notify: { channels: { board: { type: 'dashboard' } } },
  });
  const cfg = parseConfigText(text);
  if (!cfg.ok)
    throw new Error(`demo configuration: ${cfg.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
  const config = cfg.config;
  return {
    config,
    broker,
    async simulate(signal) {
      // One continuous simulation from a day ago: fast until it catches up with the wall clock, then in
      // real time (no sample is sent before its time, so the timing test never trips).
      const now = Math.floor(Date.now() / 60_000) * 60_000;
      await publishSimulation({
        config,
        brokerUrl: broker.url,
        speed: o.speed,
        seed: o.seed,
        startMs: now - o.backfillHours * HOUR,
        durationMs: 365 * 24 * HOUR,
        notAheadOfWallClock: true,
        truthPath: path.join(o.dataDir, 'truth.ndjson'),
        logger: o.logger,
        signal,
      });
    },
  };
}
