// The processor in a worker thread: the same createProcessor as in-process, replay and tests, fed one
// request at a time by the daemon's thread (worker-processor.ts). Derivations, and a checkpoint's JSON, cost
// the daemon's thread nothing: it goes on archiving, acknowledging and answering HTTP meanwhile.
import { parentPort, workerData } from 'node:worker_threads';
import { createProcessor } from '../../libs/processor/index.js';
import type { WorkerInit, WorkerReply, WorkerRequest } from './worker-protocol.js';

const port = parentPort;
if (port === null)
  throw new Error('processor-worker.ts runs as a worker thread (worker-processor.ts starts it)');
const init = workerData as WorkerInit;
const processor = createProcessor(init.config, init.saved, init.options);
const encoder = new TextEncoder();

function answer(q: WorkerRequest): WorkerReply {
  switch (q.op) {
    case 'push':
      return {
        id: q.id,
        op: 'push',
        result: processor.push(q.message, q.rxMs),
        watermarkMs: processor.watermarkMs(),
      };
    case 'drain':
      return { id: q.id, op: 'drain', records: processor.drain(), watermarkMs: processor.watermarkMs() };
    case 'view':
      return {
        id: q.id,
        op: 'view',
        view: {
          watermarkMs: processor.watermarkMs(),
          counters: processor.counters(),
          activeAlerts: processor.activeAlerts(),
          sensorHealth: processor.sensorHealth(),
        },
      };
    case 'checkpoint': {
      // The same document as the in-process checkpoint (checkpoint.ts): head members, then the state.
      const doc = { ...q.head, state: processor.snapshot({ copy: false }) };
      return { id: q.id, op: 'checkpoint', bytes: encoder.encode(JSON.stringify(doc)) };
    }
  }
}

port.on('message', (q: WorkerRequest) => {
  let reply: WorkerReply;
  try {
    reply = answer(q);
  } catch (err) {
    const e = err as Error;
    reply = { id: q.id, op: 'error', message: e.message, ...(e.stack ? { stack: e.stack } : {}) };
  }
  if (reply.op === 'checkpoint') port.postMessage(reply, [reply.bytes.buffer as ArrayBuffer]);
  else port.postMessage(reply);
});
