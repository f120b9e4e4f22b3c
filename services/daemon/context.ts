// What every start-up step of the daemon is given: the frozen configuration and the folders, the log, the
// record bus and the lifecycle each step registers what it started with.
import type { ReefdConfig, SecretRef } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import type { NotificationMessage } from '../notifiers/index.js';
import type { Bus, RecordBus } from './bus.js';
import type { Lifecycle } from './lifecycle.js';
import type { DaemonMetrics } from './metrics.js';

export interface StartContext {
  config: ReefdConfig;
  /** Folder that relative paths in the configuration are relative to. */
  baseDir: string;
  /** The data folder (checkpoint, archive, spools, ledgers, alert outbox), absolute. */
  dataDir: string;
  logger: Logger;
  env: Readonly<Record<string, string | undefined>>;
  secret: (ref: SecretRef | undefined) => Promise<string | undefined>;
  metrics: DaemonMetrics;
  /** Derived records and operational alerts, for the dashboard and the notifier. */
  bus: RecordBus;
  /** The notifier's dashboard channel: notices for the dashboard's banner. */
  notices: Bus<NotificationMessage>;
  life: Lifecycle;
  clock: () => number;
  /** MQTT protocol version for the source (5 for Mosquitto; the embedded demo broker speaks 4). */
  mqttProtocolVersion: 4 | 5;
  /** Run the processor in a worker thread (worker-processor.ts) rather than on the intake's thread. */
  processorWorker: boolean;
}
