// The fictional demo site run through the real processor in this process, for the dashboard's tests and
// previews: the simulator's messages (libs/simulator) parsed and pushed like the daemon does, giving the
// records, alerts and sensor health a live run would show, deterministically for a seed.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  parseConfigText,
  parseMessage,
  type DerivedRecord,
  type ReefdConfig,
} from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor, type Processor } from '../../libs/processor/index.js';
import { simulate } from '../../libs/simulator/index.js';
import { packageRoot } from '../paths.js';
import type { SensorHealthRow } from './sensor-watch.js';

export function demoSiteConfig(): ReefdConfig {
  const r = parseConfigText(
    readFileSync(path.join(packageRoot(), 'deploy', 'demo', 'ornen-reef.yaml'), 'utf8'),
  );
  if (!r.ok) throw new Error(`the demo configuration is invalid: ${JSON.stringify(r.problems)}`);
  return r.config;
}

export interface DemoRun {
  config: ReefdConfig;
  processor: Processor;
  /**
   * Every record in derivation order, with the sample time of the message that produced it and (with
   * `health: true`) the processor's per-sensor rows right after it.
   */
  batches: { tMs: number; records: DerivedRecord[]; health?: SensorHealthRow[] }[];
}

/** Runs `hours` of the demo from `startMs` through one processor. */
export function runDemo(o: {
  startMs: number;
  hours: number;
  seed: number;
  config?: ReefdConfig;
  health?: boolean;
}): DemoRun {
  const config = o.config ?? demoSiteConfig();
  const processor = createProcessor(config);
  const batches: DemoRun['batches'] = [];
  for (const ev of simulate(config, { startMs: o.startMs, durationMs: o.hours * 3_600_000, seed: o.seed })) {
    if (ev.type !== 'message') continue;
    const m = ev.message;
    const p = parseMessage(m.topic, Buffer.from(JSON.stringify(m.payload)), config.topic_prefix);
    if (!p.ok || checkAgainstConfig(config, p.message) !== undefined) continue;
    const r = processor.push(p.message, m.tMs + 200);
    const records = r.records;
    if (records.length > 0 || o.health)
      batches.push({ tMs: m.tMs, records, ...(o.health ? { health: processor.sensorHealth() } : {}) });
  }
  return { config, processor, batches };
}
