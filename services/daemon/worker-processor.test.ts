// The processor in its worker thread gives the records of the processor in-process, byte for byte: two
// simulated days of the demo reef through the worker, restarted half-way from the worker's own checkpoint
// bytes (as the daemon restarts), against the digest libs/processor/replay-equivalence.test.ts keeps. And a
// failing message fails alone, the HTTP view follows the pushes, and a closed worker refuses further work.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, it } from 'vitest';
import {
  parseConfigText,
  parseMessage,
  type DerivedRecord,
  type SensorMessage,
} from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor, type ProcessorState } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { startProcessorWorker, type ProcessorWorker } from './worker-processor.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config');
const config = parsed.config;
const DIGEST = 'libs/processor/testdata/demo-2d.digest.json';

/** The deliveries of the digest's scenario (replay-equivalence.test.ts): 2 days, seed 7, received +250 ms. */
function deliveries() {
  const sim = simulateMessages(config, {
    startMs: Date.UTC(2026, 2, 1),
    durationMs: 2 * 86_400_000,
    seed: 7,
  });
  return sim.messages.map((m) => {
    const p = parseMessage(m.topic, JSON.stringify(m.payload), config.topic_prefix);
    if (!p.ok || checkAgainstConfig(config, p.message) !== undefined)
      throw new Error('simulated message refused');
    return { message: p.message, rxMs: m.tMs + 250 };
  });
}

const workers: ProcessorWorker[] = [];
afterEach(async () => {
  for (const w of workers.splice(0)) await w.close();
});
async function start(saved?: ProcessorState) {
  const w = await startProcessorWorker(config, saved, undefined);
  workers.push(w);
  return w;
}

describe('processor in a worker thread', () => {
  it('gives the digest of two demo days byte for byte, restarted half-way from its own checkpoint', async () => {
    const list = deliveries();
    const fixture = JSON.parse(readFileSync(DIGEST, 'utf8')) as {
      inOrder: { all: { count: number; sha256: string } };
    };
    let w = await start();
    const records: DerivedRecord[] = [];
    const half = Math.floor(list.length / 2);
    for (let i = 0; i < list.length; i++) {
      if (i === half) {
        const bytes = await w.checkpoint({ savedAt: 'x' });
        const doc = JSON.parse(new TextDecoder().decode(bytes)) as { savedAt: string; state: ProcessorState };
        expect(doc.savedAt).toBe('x');
        await w.close();
        w = await start(doc.state);
      }
      const d = list[i]!;
      records.push(...(await w.step.push(d.message, d.rxMs)).records);
    }
    records.push(...(await w.drain()));
    const h = createHash('sha256');
    const kept = records.filter((r) => r.type !== 'light');
    for (const r of kept) h.update(JSON.stringify(r)).update('\n');
    expect({ count: kept.length, sha256: h.digest('hex') }).toEqual(fixture.inOrder.all);
  }, 300_000);

  it('writes the checkpoint the in-process processor would, and reports its view', async () => {
    const list = deliveries().slice(0, 3000);
    const w = await start();
    const local = createProcessor(config);
    for (const d of list) {
      const a = await w.step.push(d.message, d.rxMs);
      expect(a).toEqual(local.push(d.message, d.rxMs));
    }
    const bytes = await w.checkpoint({ stream: { epoch: 1 } });
    expect(new TextDecoder().decode(bytes)).toBe(
      JSON.stringify({ stream: { epoch: 1 }, state: local.snapshot() }),
    );
    expect(w.processor.watermarkMs()).toBe(local.watermarkMs());
    expect(() => w.processor.push(list[0]!.message, 0)).toThrow(/REEFD_PROCESSOR_IN_WORKER/);
  });

  it('fails a message the processor throws on, alone, and refuses work once closed', async () => {
    const [first, second] = deliveries();
    const w = await start();
    // A kind the processor has no module for makes it throw (validation keeps such messages out in the
    // daemon; here it stands for any defect in a derivation).
    const stray = { ...first!.message, kind: 'bogus' } as unknown as SensorMessage;
    await expect(w.step.push(stray, first!.rxMs)).rejects.toThrow(/completeMs/);
    const ok = await w.step.push(second!.message, second!.rxMs);
    expect(ok.status).toBe('ok');
    await w.close();
    workers.length = 0;
    await expect(w.step.push(second!.message, second!.rxMs)).rejects.toThrow(/REEFD_PROCESSOR_WORKER_CLOSED/);
  });
});
