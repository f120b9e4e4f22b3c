// The processor's records on two simulated days of the demo reef (deploy/demo/ornen-reef.yaml, libs/simulator
// with its scripted faults) compared with a digest (testdata/demo-2d.digest.json) first generated from main at
// the per-kind registry's branch point and regenerated since only where a change of the records was intended:
// each such commit says why the records changed (git log of the digest). `light` records (one per PAR sample)
// are left out; every other record, its order, the counters and the checkpoint's shape must match.
//
// Regenerate (only when a change of the records is intended, and say why in the commit):
//   REEFD_WRITE_DIGEST=1 npx vitest run libs/processor/replay-equivalence.test.ts
//   npx prettier --write libs/processor/testdata/demo-2d.digest.json   (then read its git diff)
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type DerivedRecord, type SensorMessage } from '../contract/index.js';
import { createRng, simulateMessages } from '../simulator/index.js';
import { checkAgainstConfig, createProcessor, type ProcessorState } from './index.js';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const FIXTURE = path.join(HERE, 'testdata', 'demo-2d.digest.json');
const DEMO = path.resolve(HERE, '../../deploy/demo/ornen-reef.yaml');
const START_MS = Date.UTC(2026, 2, 1);
const DAYS = 2;
/** Record types added since the fixture was made (their records are left out of the comparison). */
const NEW_TYPES: ReadonlySet<string> = new Set(['light']);

interface Delivery {
  message: SensorMessage;
  rxMs: number;
}

interface TypeDigest {
  count: number;
  sha256: string;
}

interface RunDigest {
  /** Every record but the new types, in output order. */
  all: TypeDigest;
  byType: Record<string, TypeDigest>;
  counters: Record<string, unknown>;
}

interface Fixture {
  scenario: string;
  inOrder: RunDigest;
  shuffled: RunDigest;
  /** Top-level keys of the checkpoint, the series of a station and of the site, and the state version. */
  stateShape: { keys: string[]; stationVars: string[]; siteVars: string[]; version: number };
}

function loadConfig() {
  const parsed = parseConfigText(readFileSync(DEMO, 'utf8'));
  if (!parsed.ok) throw new Error(`demo config invalid: ${JSON.stringify(parsed.problems)}`);
  return parsed.config;
}

/** The simulated messages, parsed as the daemon parses them, received 250 ms after they are sent. */
function deliveries(config: ReturnType<typeof loadConfig>): Delivery[] {
  const sim = simulateMessages(config, { startMs: START_MS, durationMs: DAYS * 86_400_000, seed: 7 });
  const out: Delivery[] = [];
  for (const m of sim.messages) {
    const p = parseMessage(m.topic, JSON.stringify(m.payload), config.topic_prefix);
    if (!p.ok) throw new Error(`simulated message refused: ${p.reason}`);
    if (checkAgainstConfig(config, p.message) !== undefined) throw new Error('simulated sensor unknown');
    out.push({ message: p.message, rxMs: m.tMs + 250 });
  }
  return out;
}

/**
 * A rougher delivery of the same messages, seeded: swaps of neighbours (out of order within minutes), one
 * message in 50 sent twice, one in 200 held back 40 min (late), and one in 500 stamped 5 min ahead of its
 * receipt (a clock fault).
 */
function roughen(list: readonly Delivery[]): Delivery[] {
  const rng = createRng(3);
  const out: Delivery[] = [];
  const delayed: Delivery[] = [];
  for (const d of list) {
    while (delayed.length > 0 && (delayed[0] as Delivery).rxMs <= d.rxMs)
      out.push(delayed.shift() as Delivery);
    const u = rng.next();
    if (u < 0.002) {
      out.push({ message: d.message, rxMs: d.message.tMs - 5 * 60_000 });
      continue;
    }
    if (u < 0.007) {
      delayed.push({ message: d.message, rxMs: d.rxMs + 40 * 60_000 });
      continue;
    }
    out.push(d);
    if (u < 0.027) out.push(d);
  }
  out.push(...delayed);
  for (let i = 1; i < out.length; i++) {
    if (rng.next() < 0.1) {
      const a = out[i - 1] as Delivery;
      out[i - 1] = out[i] as Delivery;
      out[i] = a;
    }
  }
  return out;
}

function digest(lines: readonly string[]): TypeDigest {
  const h = createHash('sha256');
  for (const l of lines) h.update(l).update('\n');
  return { count: lines.length, sha256: h.digest('hex') };
}

/**
 * Feeds the deliveries, with a checkpoint half-way (JSON round trip into a new processor, as the daemon
 * restarts), and drains. Returns the digest and the last checkpoint.
 */
function replay(
  config: ReturnType<typeof loadConfig>,
  list: readonly Delivery[],
): { digest: RunDigest; records: DerivedRecord[]; state: ProcessorState } {
  let p = createProcessor(config);
  const records: DerivedRecord[] = [];
  const half = Math.floor(list.length / 2);
  list.forEach((d, i) => {
    if (i === half) p = createProcessor(config, JSON.parse(JSON.stringify(p.snapshot())) as ProcessorState);
    records.push(...p.push(d.message, d.rxMs).records);
  });
  records.push(...p.drain());
  const kept = records.filter((r) => !NEW_TYPES.has(r.type));
  const byTypeLines: Record<string, string[]> = {};
  for (const r of kept) (byTypeLines[r.type] ??= []).push(JSON.stringify(r));
  const counters = p.counters() as unknown as Record<string, unknown>;
  const counted = { ...(counters.records as Record<string, number>) };
  for (const t of NEW_TYPES) delete counted[t];
  return {
    digest: {
      all: digest(kept.map((r) => JSON.stringify(r))),
      byType: Object.fromEntries(
        Object.entries(byTypeLines)
          .sort(([a], [b]) => (a < b ? -1 : 1))
          .map(([t, l]) => [t, digest(l)]),
      ),
      counters: { ...counters, records: counted },
    },
    records,
    state: p.snapshot(),
  };
}

function shapeOf(state: ProcessorState): Fixture['stateShape'] {
  const anyStation = Object.values(state.stations)[0] ?? {};
  return {
    keys: Object.keys(state).sort(),
    stationVars: Object.keys(anyStation).sort(),
    siteVars: Object.keys(state.site).sort(),
    version: state.version,
  };
}

describe('records on two simulated days of the demo reef, against the digest from before the registry', () => {
  const config = loadConfig();
  let inOrder: ReturnType<typeof replay>;
  let shuffled: ReturnType<typeof replay>;
  let fixture: Fixture;
  let parMessages = 0;

  beforeAll(() => {
    const list = deliveries(config);
    parMessages = list.filter((d) => d.message.kind === 'par').length;
    inOrder = replay(config, list);
    shuffled = replay(config, roughen(list));
    const now: Fixture = {
      scenario: `${path.basename(DEMO)}, seed 7, ${DAYS} d from ${new Date(START_MS).toISOString()}, faults on`,
      inOrder: inOrder.digest,
      shuffled: shuffled.digest,
      stateShape: shapeOf(inOrder.state),
    };
    if (process.env.REEFD_WRITE_DIGEST === '1') writeFileSync(FIXTURE, JSON.stringify(now, null, 2) + '\n');
    fixture = JSON.parse(readFileSync(FIXTURE, 'utf8')) as Fixture;
  }, 300_000);

  it('covers every derived record type the processor makes, the faults and the rough delivery', () => {
    for (const t of ['waves', 'current', 'carbonate', 'oxygen', 'flux', 'alert', 'daily', 'forecast'])
      expect(fixture.inOrder.byType[t]?.count ?? 0, t).toBeGreaterThan(0);
    const c = fixture.shuffled.counters;
    expect(c.duplicates as number).toBeGreaterThan(0);
    expect(c.late as number).toBeGreaterThan(0);
    expect(c.clockFaults as number).toBeGreaterThan(0);
  });

  it('gives the same records in the same order, delivered as sent', () => {
    expect(inOrder.digest.byType).toEqual(fixture.inOrder.byType);
    expect(inOrder.digest.all).toEqual(fixture.inOrder.all);
    expect(inOrder.digest.counters).toEqual(fixture.inOrder.counters);
  });

  it('gives the same records in the same order, delivered out of order, twice, late and ahead', () => {
    expect(shuffled.digest.byType).toEqual(fixture.shuffled.byType);
    expect(shuffled.digest.all).toEqual(fixture.shuffled.all);
    expect(shuffled.digest.counters).toEqual(fixture.shuffled.counters);
  });

  it('adds one light record per PAR sample; the types new since the digest are those of NEW_TYPES', () => {
    const light = inOrder.records.filter((r) => r.type === 'light');
    expect(parMessages).toBeGreaterThan(500); // 2 d at 5 min
    expect(light.length).toBe(parMessages);
    const types = new Set(inOrder.records.map((r) => r.type));
    const added = [...types].filter((t) => fixture.inOrder.byType[t] === undefined);
    expect(added.sort()).toEqual([...NEW_TYPES].sort());
  });

  it('keeps the checkpoint shape and version', () => {
    expect(shapeOf(inOrder.state)).toEqual(fixture.stateShape);
  });
});
