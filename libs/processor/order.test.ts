// Delivery-order independence (docs/contract-v1.md section 4, Time; README `processing.reorder_min`): with
// reorder_min = lateness_min the processor's records are a function of the messages alone, whatever their order
// within the lateness. Checked on the simulated demo reef (deploy/demo/ornen-reef.yaml, fictional), whose
// scripted faults include a dead CTD (stale), a frozen pCO2, spikes, and a site uplink that sends its backlog at
// once: the cases where the watermark's effects (stale faults, flux windows, stale alerts) meet held messages.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type SensorMessage } from '../contract/index.js';
import { createRng, simulateMessages } from '../simulator/index.js';
import { createProcessor } from './index.js';
import { before, completeMs, hold, takeDue } from './order.js';
import { createState } from './state.js';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const DEMO = path.resolve(HERE, '../../deploy/demo/ornen-reef.yaml');
const MIN = 60_000;
const LATENESS_MIN = 10;

function demoConfig() {
  const demo = parseYaml(readFileSync(DEMO, 'utf8')) as Record<string, unknown>;
  const text = JSON.stringify({
    ...demo,
    processing: { lateness_min: LATENESS_MIN, reorder_min: LATENESS_MIN },
  });
  const parsed = parseConfigText(text);
  if (!parsed.ok) throw new Error(`demo config invalid: ${JSON.stringify(parsed.problems)}`);
  return parsed.config;
}

interface Delivery {
  message: SensorMessage;
  rxMs: number;
}

/** The simulated messages in the order the loggers send them, received 1 s after. */
function deliveries(config: ReturnType<typeof demoConfig>, startMs: number, hours: number, seed: number) {
  const sim = simulateMessages(config, { startMs, durationMs: hours * 3_600_000, seed });
  return sim.messages.map((m): Delivery => {
    const p = parseMessage(m.topic, JSON.stringify(m.payload), config.topic_prefix);
    if (!p.ok) throw new Error(`simulated message refused: ${p.reason}`);
    return { message: p.message, rxMs: m.tMs + 1000 };
  });
}

/** Each message moved by up to `spreadMs` of its completion time (a spread under the lateness). */
function shuffleWithin(list: readonly Delivery[], spreadMs: number, seed: number): Delivery[] {
  const rng = createRng(seed);
  return list
    .map((d) => ({ d, k: completeMs(d.message) + rng.next() * spreadMs }))
    .sort((x, y) => x.k - y.k)
    .map((x) => x.d);
}

/** Every record as a JSON line, sorted (the set of records), and the late count. */
function run(config: ReturnType<typeof demoConfig>, list: readonly Delivery[]) {
  const p = createProcessor(config);
  const lines: string[] = [];
  let late = 0;
  for (const d of list) {
    const r = p.push(d.message, d.rxMs);
    if (r.late) late++;
    for (const rec of r.records) lines.push(JSON.stringify(rec));
  }
  return { lines: lines.sort(), late, counters: p.counters() };
}

describe('records shuffled within reorder_min = lateness_min are those of the messages in order', () => {
  const config = demoConfig();

  it('on the demo reef with its scripted faults, for any shuffle within the lateness', () => {
    // Start hours and shuffles under which the processor before the fix gave different records (a stale
    // fault or a flux window's validity decided by how many messages one delivery released).
    fc.assert(
      fc.property(
        fc.constantFrom(0, 3, 15, 19),
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.double({ min: 0.3, max: 0.95, noNaN: true }),
        (hour, seed, spread) => {
          const list = deliveries(config, Date.UTC(2026, 5, 10, hour), 6, 11);
          const inOrder = run(config, list);
          const shuffled = run(config, shuffleWithin(list, spread * LATENESS_MIN * MIN, seed));
          expect(inOrder.late).toBe(0);
          expect(shuffled.late).toBe(0);
          expect(inOrder.lines.length).toBeGreaterThan(700);
          expect(shuffled.lines.length).toBe(inOrder.lines.length);
          const i = shuffled.lines.findIndex((l, k) => l !== inOrder.lines[k]);
          expect(i < 0 ? '' : `in order ${inOrder.lines[i]}\nshuffled ${shuffled.lines[i]}`).toBe('');
          expect(shuffled.counters.records).toEqual(inOrder.counters.records);
        },
      ),
      { numRuns: 4, seed: 20261205 },
    );
  }, 240_000);

  it('gives the records of the scripted faults in both orders (the comparison covers them)', () => {
    const list = deliveries(config, Date.UTC(2026, 5, 10, 15), 6, 11);
    const lines = run(config, shuffleWithin(list, 9.5 * MIN, 9)).lines;
    const has = (s: string) => lines.some((l) => l.includes(s));
    expect(has('"type":"flux"')).toBe(true);
    expect(has('/stale')).toBe(true);
    expect(has('/flatline')).toBe(true);
    expect(has('"rule":"stale"')).toBe(true);
  }, 60_000);
});

describe('the hold', () => {
  const msg = (kind: SensorMessage['kind'], tMs: number, extra: object = {}): SensorMessage =>
    ({ v: 1, site: 's', station: 'a', sensor: kind, kind, t: '', tMs, ...extra }) as unknown as SensorMessage;
  // A 2048-sample burst at 2 Hz stamped at 0 is complete 1023.5 s later.
  const burst = msg('pressure', 0, { fs_hz: 2, p_dbar: new Array<number>(2048).fill(10) });
  const ctd = msg('ctd', 600_000);

  it('orders by completion time: a burst stamped before a CTD sample but complete after it comes after', () => {
    expect(completeMs(burst)).toBe(1_023_500);
    expect(before(ctd, burst)).toBe(true);
    expect(before(burst, ctd)).toBe(false);
    const state = createState(['a']);
    hold(state, burst, 0);
    hold(state, ctd, 0);
    expect(state.held.map((h) => h.message.kind)).toEqual(['ctd', 'pressure']);
    // Released once complete: the CTD sample at 10 min, the burst only when the bound reaches its end.
    expect(takeDue(state, 1_000_000).map((h) => h.message.kind)).toEqual(['ctd']);
    expect(takeDue(state, 1_023_499)).toEqual([]);
    expect(takeDue(state, 1_023_500).map((h) => h.message.kind)).toEqual(['pressure']);
  });
});
