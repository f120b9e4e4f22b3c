// What the daemon's thread and the processor's worker thread say to each other (worker-processor.ts,
// processor-worker.ts). Requests are answered one by one, in the order sent, so a checkpoint asked for
// between two pushes sees exactly the pushes sent before it.
import type { DerivedRecord, ReefdConfig, SensorMessage } from '../../libs/contract/index.js';
import type {
  ProcessorOptions,
  ProcessorState,
  PushResult,
  SensorHealthRow,
} from '../../libs/processor/index.js';

export interface WorkerInit {
  config: ReefdConfig;
  saved: ProcessorState | undefined;
  options: ProcessorOptions | undefined;
}

/** What the HTTP side reads of the processor, as the worker last reported it. */
export interface ProcessorView {
  watermarkMs: number;
  counters: ProcessorState['counters'];
  activeAlerts: DerivedRecord[];
  sensorHealth: SensorHealthRow[];
}

export type WorkerRequest =
  | { id: number; op: 'push'; message: SensorMessage; rxMs: number }
  | { id: number; op: 'drain' }
  | { id: number; op: 'view' }
  /** The checkpoint's JSON as UTF-8 bytes (the stream and the live state go in as they were at rest). */
  | { id: number; op: 'checkpoint'; head: Record<string, unknown> };

export type WorkerReply =
  | { id: number; op: 'push'; result: PushResult; watermarkMs: number }
  | { id: number; op: 'drain'; records: DerivedRecord[]; watermarkMs: number }
  | { id: number; op: 'view'; view: ProcessorView }
  | { id: number; op: 'checkpoint'; bytes: Uint8Array }
  | { id: number; op: 'error'; message: string; stack?: string };
