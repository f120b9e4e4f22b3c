// The daemon's edge-mode hook: the bridge of the configuration's `bridge` section, and the processor the
// pipeline runs with it (deploy/SCALING.md). Without a `bridge` section the daemon is unchanged.
import path from 'node:path';
import type { ReefdConfig, SecretRef } from '../../libs/contract/index.js';
import {
  createProcessor,
  type Processor,
  type ProcessorOptions,
  type ProcessorState,
} from '../../libs/processor/index.js';
import type { Logger } from '../log/logger.js';
import type { TlsFiles } from '../transport/tls.js';
import { createBridgeProcessor } from './bridge-processor.js';
import { createEdgeBridge, type EdgeBridge } from './edge-bridge.js';

export interface EdgeSetup {
  bridge: EdgeBridge | undefined;
  processor: Processor;
}

export async function edgeFromConfig(o: {
  config: ReefdConfig;
  saved: ProcessorState | undefined;
  /** The calibration file and the logbook (services/config/field-files.ts). */
  processorOptions?: ProcessorOptions;
  dataDir: string;
  logger: Logger;
  secret: (ref: SecretRef | undefined) => Promise<string | undefined>;
  tls: (t: TlsFiles | undefined) => TlsFiles | undefined;
}): Promise<EdgeSetup> {
  const b = o.config.bridge;
  if (b === undefined)
    return { bridge: undefined, processor: createProcessor(o.config, o.saved, o.processorOptions) };
  const k = b.kafka;
  const bridge = await createEdgeBridge({
    brokers: k.brokers,
    clientId: k.client_id,
    topic: k.topic,
    partitionBy: k.partition_by,
    tls: o.tls(k.tls),
    sasl: k.sasl
      ? {
          mechanism: k.sasl.mechanism,
          username: k.sasl.username,
          password: (await o.secret(k.sasl.password)) ?? '',
        }
      : undefined,
    spoolDir: path.join(o.dataDir, 'spool', 'bridge'),
    spoolMaxMb: k.spool_max_mb,
    logger: o.logger,
  });
  const inner = b.derive ? createProcessor(o.config, o.saved, o.processorOptions) : undefined;
  o.logger.info(
    { topic: k.topic, partitionBy: k.partition_by, derive: b.derive },
    'edge mode: accepted messages are forwarded to Kafka',
  );
  return { bridge, processor: createBridgeProcessor(o.config, (m, rx) => bridge.forward(m, rx), inner) };
}
