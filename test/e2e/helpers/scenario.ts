// One end-to-end scenario: the demo site under a fresh site id and topic prefix, a temp data folder, and
// a few simulated hours of its messages starting a day in the past (the timing QC refuses samples more
// than 60 s ahead of the wall clock).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { simulateMessages, type SimMessage } from '../../../libs/simulator/index.js';
import type { ReefdConfig } from '../../../libs/contract/index.js';
import { randomSuffix } from '../../integration/env.js';
import { demoYaml, parsedConfig, writeConfig } from './reefd.js';

export interface Scenario {
  id: string;
  site: string;
  prefix: string;
  dir: string;
  dataDir: string;
  configFile: string;
  config: ReefdConfig;
  messages: SimMessage[];
}

const HOUR = 3_600_000;

export function makeScenario(
  name: string,
  extend: (base: { site: string; prefix: string; dataDir: string; id: string }) => Record<string, unknown>,
  opts: { hours?: number; seed?: number } = {},
): Scenario {
  const id = randomSuffix();
  const site = `ornen-${name}-${id}`;
  const prefix = `it-${id}`;
  const dir = mkdtempSync(path.join(tmpdir(), `reefd-e2e-${name}-`));
  const dataDir = path.join(dir, 'data');
  const cfg = {
    ...demoYaml(),
    site,
    topic_prefix: prefix,
    data_dir: dataDir,
    http: { port: 0 },
    ...extend({ site, prefix, dataDir, id }),
  };
  const configFile = writeConfig(path.join(dir, 'reefd.yaml'), cfg);
  const config = parsedConfig(cfg);
  // Whole minutes a day back, so the run does not depend on the second it starts at.
  const startMs = Math.floor((Date.now() - 24 * HOUR) / 60_000) * 60_000;
  const { messages } = simulateMessages(config, {
    startMs,
    durationMs: (opts.hours ?? 4) * HOUR,
    seed: opts.seed ?? 20261202,
  });
  return { id, site, prefix, dir, dataDir, configFile, config, messages };
}
