// The daemon's side of the processor's worker thread (processor-worker.ts). The pipeline calls `step.push`
// one message at a time, in archive order (pipeline.ts), and acknowledges a message only once its result is
// back: while the worker is busy the messages wait in the pipeline's queue unacknowledged, and the broker
// holds the rest (its in-flight window, MQTT Receive Maximum, bounds that queue). The HTTP side reads a view
// of the processor the worker refreshes at most once a second.
import { DAEMON_ERRORS } from './errors.js';
import { Worker } from 'node:worker_threads';
import type { ReefdConfig } from '../../libs/contract/index.js';
import type { Processor, ProcessorOptions, ProcessorState, PushResult } from '../../libs/processor/index.js';
import type { ProcessorStep } from './pipeline.js';
import type { ProcessorView, WorkerInit, WorkerReply, WorkerRequest } from './worker-protocol.js';

export interface ProcessorWorker {
  readonly step: ProcessorStep;
  /** For the HTTP side: watermark, counters, alerts and sensor health as the worker last reported them. */
  readonly processor: Processor;
  /** The checkpoint's JSON (UTF-8) with `head` members before the state, of the state after every push sent so far. */
  checkpoint(head: Record<string, unknown>): Promise<Uint8Array>;
  /** Every window whose end the data has passed (end of a replay). */
  drain(): Promise<PushResult['records']>;
  close(): Promise<void>;
}

/** How old the HTTP side's view may get before a read asks the worker for a new one, ms. */
const VIEW_MAX_AGE_MS = 1000;

type Pending = { resolve: (r: WorkerReply) => void; reject: (e: Error) => void };

/** The worker thread's entry: compiled JavaScript in a build, TypeScript (through tsx) in tests and benches. */
function spawnWorker(init: WorkerInit): Worker {
  const entry = new URL(
    import.meta.url.endsWith('.ts') ? './processor-worker.ts' : './processor-worker.js',
    import.meta.url,
  );
  if (entry.pathname.endsWith('.js')) return new Worker(entry, { workerData: init });
  const tsx = import.meta.resolve('tsx/esm/api');
  const boot = `import(${JSON.stringify(tsx)}).then((t) => { t.register(); return import(${JSON.stringify(entry.href)}); });`;
  return new Worker(boot, { eval: true, workerData: init });
}

export async function startProcessorWorker(
  config: ReefdConfig,
  saved: ProcessorState | undefined,
  options: ProcessorOptions | undefined,
): Promise<ProcessorWorker> {
  const worker = spawnWorker({ config, saved, options });
  const pending = new Map<number, Pending>();
  let nextId = 1;
  let dead: Error | undefined;
  let watermarkMs = 0;
  const fail = (err: Error): void => {
    dead ??= err;
    for (const p of pending.values()) p.reject(dead);
    pending.clear();
  };
  worker.on('message', (r: WorkerReply) => {
    const p = pending.get(r.id);
    if (p === undefined) return;
    pending.delete(r.id);
    if (r.op === 'error') {
      const e = new Error(r.message);
      if (r.stack !== undefined) e.stack = r.stack;
      p.reject(e);
    } else p.resolve(r);
  });
  worker.on('error', (err) => fail(err));
  worker.on('exit', (code) =>
    fail(DAEMON_ERRORS.error('REEFD_PROCESSOR_WORKER_EXIT', `the worker exited with code ${code}`)),
  );

  function ask<Op extends WorkerReply['op']>(q: WorkerRequest): Promise<Extract<WorkerReply, { op: Op }>> {
    if (dead !== undefined) return Promise.reject(dead);
    return new Promise((resolve, reject) => {
      pending.set(q.id, { resolve: resolve as (r: WorkerReply) => void, reject });
      worker.postMessage(q);
    });
  }

  let view: ProcessorView = (await ask<'view'>({ id: nextId++, op: 'view' })).view;
  let viewAtMs = performance.now();
  let refreshing = false;
  /** The view as it is, and a new one asked for when it is older than VIEW_MAX_AGE_MS. */
  const current = (): ProcessorView => {
    if (!refreshing && dead === undefined && performance.now() - viewAtMs > VIEW_MAX_AGE_MS) {
      refreshing = true;
      ask<'view'>({ id: nextId++, op: 'view' })
        .then((r) => {
          view = r.view;
          viewAtMs = performance.now();
        })
        .catch(() => undefined)
        .finally(() => (refreshing = false));
    }
    return view;
  };
  const inWorker = (what: string) => (): never => {
    throw DAEMON_ERRORS.error('REEFD_PROCESSOR_IN_WORKER', `${what} runs in the processor's worker`);
  };

  return {
    step: {
      push: async (message, rxMs) => {
        const r = await ask<'push'>({ id: nextId++, op: 'push', message, rxMs });
        watermarkMs = r.watermarkMs;
        return r.result;
      },
    },
    processor: {
      push: inWorker('push'),
      drain: inWorker('drain'),
      snapshot: inWorker('snapshot'),
      watermarkMs: () => Math.max(watermarkMs, current().watermarkMs),
      counters: () => current().counters,
      activeAlerts: () => current().activeAlerts,
      sensorHealth: () => current().sensorHealth,
    },
    checkpoint: async (head) => (await ask<'checkpoint'>({ id: nextId++, op: 'checkpoint', head })).bytes,
    drain: async () => {
      const r = await ask<'drain'>({ id: nextId++, op: 'drain' });
      watermarkMs = r.watermarkMs;
      return r.records;
    },
    close: async () => {
      fail(DAEMON_ERRORS.error('REEFD_PROCESSOR_WORKER_CLOSED'));
      await worker.terminate();
    },
  };
}
