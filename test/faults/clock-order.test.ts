// Fault (g): clock skew and out-of-order delivery, on the fictional demo reef (deploy/demo/ornen-reef.yaml,
// simulated). Two daemons get the same six hours: one in the order the loggers send them, one shuffled within
// half the lateness on event time. Their flux records are the same. Messages held back past the lateness are
// counted late; messages from a sensor whose clock runs 5 min ahead are archived, flagged as a timing fault
// and not processed.
import { readFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfigOrThrow } from '../../services/config/load.js';
import { createRng, simulateMessages } from '../../libs/simulator/index.js';
import { countArchive, summary, waitFor } from './helpers/count.js';
import { REPO, spawnDaemon, writeConfig, type DaemonChild } from './helpers/daemon.js';
import { startPrivateMosquitto } from './helpers/procs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, type Msg } from './helpers/traffic.js';

const inOrder = caseEnv('g');
const shuffled = caseEnv('h');
afterAll(async () => {
  await inOrder.cleanup();
  await shuffled.cleanup();
});

const DEMO = join(REPO, 'deploy/demo/ornen-reef.yaml');
const LATENESS_MIN = 10;
const SHUFFLE_MS = 5 * 60_000; // half the lateness

interface Rec {
  type: string;
  t: string;
  transect?: string;
  [k: string]: unknown;
}

async function records(file: string): Promise<Rec[]> {
  const text = await readFile(file, 'utf8').catch(() => '');
  return text
    .split('\n')
    .filter((l) => l.trim() !== '')
    .map((l) => JSON.parse(l) as Rec);
}

function sameRecords(a: Rec[], b: Rec[]): { equal: boolean; firstDiff: string } {
  if (a.length !== b.length) return { equal: false, firstDiff: `lengths ${a.length} vs ${b.length}` };
  for (let i = 0; i < a.length; i++) {
    const x = a[i] as Rec;
    const y = b[i] as Rec;
    for (const k of new Set([...Object.keys(x), ...Object.keys(y)])) {
      const u = x[k];
      const v = y[k];
      if (typeof u === 'number' && typeof v === 'number') {
        if (Math.abs(u - v) > 1e-9 * Math.max(1, Math.abs(u)))
          return { equal: false, firstDiff: `${i}.${k}: ${u} vs ${v}` };
      } else if (JSON.stringify(u) !== JSON.stringify(v))
        return { equal: false, firstDiff: `${i}.${k}: ${JSON.stringify(u)} vs ${JSON.stringify(v)}` };
    }
  }
  return { equal: true, firstDiff: '' };
}

interface Outcome {
  line: string;
  sent: [number, number];
  acked: [number, number];
  archived: [number, number];
  displaced: number;
  fluxA: Rec[];
  cmp: { equal: boolean; firstDiff: string };
  late: [number, number];
  expectedLate: [number, number];
  aheadSent: number;
  aheadRecords: number;
  clockFaults: [number, number];
  oxygenDiffering: number;
  oxygenCompared: number;
}
let out: Outcome;

/** A message's event time: when it is complete, its `t`, or for a pressure burst the time of its last sample. */
function eventMs(payload: object): number {
  const p = payload as { t: string; p_dbar?: unknown[]; fs_hz?: number };
  return (
    Date.parse(p.t) +
    (p.p_dbar !== undefined && p.fs_hz !== undefined
      ? Math.round(((p.p_dbar.length - 1) / p.fs_hz) * 1000)
      : 0)
  );
}

/** The lateness rule (watermark = highest event time so far - lateness) applied to a stream. */
function expectedLate(stream: readonly Msg[], latenessMs: number, clockAhead: ReadonlySet<string>): number {
  let max = 0;
  let late = 0;
  for (const m of stream) {
    if (clockAhead.has(m.payload)) continue;
    const t = eventMs(JSON.parse(m.payload) as object);
    if (max > 0 && t < max - latenessMs) late++;
    if (t > max) max = t;
  }
  return late;
}

async function clockFaults(dataDir: string): Promise<number> {
  const cp = JSON.parse(await readFile(join(dataDir, 'checkpoint.json'), 'utf8')) as {
    state: { counters: { clockFaults: number } };
  };
  return cp.state.counters.clockFaults;
}

describe('fault g: clock skew and out-of-order delivery', () => {
  beforeAll(async () => {
    const mosq = await startPrivateMosquitto();
    inOrder.defer(() => mosq.stop());
    const demo = parseYaml(readFileSync(DEMO, 'utf8')) as Record<string, unknown>;
    const demoCfg = await loadConfigOrThrow(DEMO);
    const now = Date.now();
    const startMs = Math.floor((now - 8 * 3600_000) / 600_000) * 600_000;
    const sim = simulateMessages(demoCfg, { startMs, durationMs: 6 * 3600_000, seed: 11 });

    // Held back past the lateness: the lagoon CTD's first 12 samples (the lagoon is in no transect).
    const lagoonCtd = sim.messages.filter((m) => m.topic.endsWith('/lagoon/ctd/ctd-lagoon')).slice(0, 12);
    const held = new Set(lagoonCtd);
    const base = sim.messages.filter((m) => !held.has(m));
    // A lagoon optode whose clock runs 5 min ahead of the wall clock.
    const ahead = [0, 1, 2, 3, 4].map((i) => ({
      topic: 'reef/ornen-reef/lagoon/oxygen/o2-lagoon',
      payload: { v: 1, t: new Date(now + 5 * 60_000 + i * 1000).toISOString(), o2_umol_l: 200, temp_c: 28 },
      tMs: now + 5 * 60_000 + i * 1000,
    }));
    // Shuffled on event time, not on sending time: the simulated uplink outage sends its backlog (up to 40 min
    // of event time) at once when the link returns, so a shuffle of sending times would push those messages
    // past the lateness, where the processor derives them on arrival and no delivery-order guarantee holds.
    const rng = createRng(5);
    const keyed = base.map((m) => ({ m, k: eventMs(m.payload) + rng.next() * SHUFFLE_MS }));
    const shuffledBase = keyed.sort((x, y) => x.k - y.k).map((x) => x.m);
    let displaced = 0;
    shuffledBase.forEach((m, i) => (displaced += m === base[i] ? 0 : 1));

    const run = async (
      env: typeof inOrder,
      stream: typeof base,
    ): Promise<{ d: DaemonChild; msgs: Msg[] }> => {
      const cfg = {
        ...demo,
        topic_prefix: env.prefix,
        // reorder_min = lateness: messages are derived in event-time order, whatever the delivery order
        processing: { lateness_min: LATENESS_MIN, reorder_min: LATENESS_MIN },
        sources: { mqtt: { url: mosq.url, client_id: `reefd-${env.prefix}` } },
        outputs: { ndjson: { path: join(env.dataDir, 'records.ndjson') } },
        archive: { fsync_ms: 50 },
        data_dir: env.dataDir,
        http: { port: 0 },
      };
      const d = await spawnDaemon(writeConfig(cfg));
      env.defer(() => d.kill('SIGKILL'));
      const msgs = [...stream, ...lagoonCtd, ...ahead].map((m) => {
        const p = m.payload as { t: string };
        const topic = m.topic.replace(/^reef\//, `${env.prefix}/`);
        const parts = topic.split('/');
        return {
          topic,
          payload: JSON.stringify(m.payload),
          key: `${parts.at(-3) ?? ''}/${parts.at(-1) ?? ''}/${Date.parse(p.t)}`,
          kind: 'oxygen' as const,
          tMs: m.tMs,
        };
      });
      return { d, msgs };
    };
    const a = await run(inOrder, base);
    const b = await run(shuffled, shuffledBase);
    const pubA = await connectPublisher(mosq.url, `pub-${inOrder.id}`);
    const pubB = await connectPublisher(mosq.url, `pub-${shuffled.id}`);
    inOrder.defer(() => pubA.end());
    shuffled.defer(() => pubB.end());
    // One in flight at a time: the daemon sees exactly the order published.
    await Promise.all([pubA.publish(a.msgs, 1), pubB.publish(b.msgs, 1)]);
    // Counted in at receipt, processed once archived: the late counter is read when every message is through
    // the processor (reading it after the intake count missed the last, held-back messages on a slow machine).
    for (const x of [a, b])
      await waitFor(async () => (await x.d.metric('reefd_process_seconds_count')) >= x.msgs.length, 20_000);
    const lateA = await a.d.metric('reefd_late_messages_total');
    const lateB = await b.d.metric('reefd_late_messages_total');
    expect((await a.d.kill('SIGTERM')).code).toBe(0);
    expect((await b.d.kill('SIGTERM')).code).toBe(0);

    const recA = await records(join(inOrder.dataDir, 'records.ndjson'));
    const recB = await records(join(shuffled.dataDir, 'records.ndjson'));
    const byKey = (x: Rec, y: Rec) =>
      `${x.transect ?? ''}|${x.t}`.localeCompare(`${y.transect ?? ''}|${y.t}`);
    const fluxA = recA.filter((r) => r.type === 'flux').sort(byKey);
    const fluxB = recB.filter((r) => r.type === 'flux').sort(byKey);
    const cmp = sameRecords(fluxA, fluxB);
    const aheadTs = new Set(ahead.map((m) => m.payload.t));
    const aheadRecords = [...recA, ...recB].filter((r) => r.type === 'oxygen' && aheadTs.has(r.t)).length;
    const archA = await countArchive(inOrder.archiveDir, inOrder.prefix);
    const archB = await countArchive(shuffled.archiveDir, shuffled.prefix);
    const aheadPayloads = new Set(a.msgs.slice(-ahead.length).map((m) => m.payload));
    const oxA = new Map(
      recA.filter((r) => r.type === 'oxygen').map((r) => [`${String(r.station)}|${r.t}`, r]),
    );
    let oxygenDiffering = 0;
    let oxygenCompared = 0;
    for (const r of recB) {
      if (r.type !== 'oxygen') continue;
      const q = oxA.get(`${String(r.station)}|${r.t}`);
      if (!q) continue;
      oxygenCompared++;
      if (Math.abs(Number(q.o2_umol_kg) - Number(r.o2_umol_kg)) > 1e-9) oxygenDiffering++;
    }
    out = {
      line: '',
      sent: [a.msgs.length, b.msgs.length],
      acked: [pubA.acked.size, pubB.acked.size],
      archived: [archA.byKey.size, archB.byKey.size],
      displaced,
      fluxA,
      cmp,
      late: [lateA, lateB],
      expectedLate: [
        expectedLate(a.msgs, LATENESS_MIN * 60_000, aheadPayloads),
        expectedLate(b.msgs, LATENESS_MIN * 60_000, aheadPayloads),
      ],
      aheadSent: ahead.length * 2,
      aheadRecords,
      clockFaults: [await clockFaults(inOrder.dataDir), await clockFaults(shuffled.dataDir)],
      oxygenDiffering,
      oxygenCompared,
    };
    out.line = summary('g (clock skew, out of order)', {
      sent: out.sent[0] + out.sent[1],
      acked: out.acked[0] + out.acked[1],
      archived: out.archived[0] + out.archived[1],
      'messages displaced by the shuffle': displaced,
      'flux records in order / shuffled': `${fluxA.length} / ${fluxB.length}`,
      'flux equal': cmp.equal ? 'yes' : `no (first difference ${cmp.firstDiff})`,
      'oxygen records differing': `${oxygenDiffering} of ${oxygenCompared}`,
      'late in order / shuffled': `${lateA} / ${lateB}`,
      'late expected (watermark rule)': `${out.expectedLate[0]} / ${out.expectedLate[1]}`,
      'clock-ahead sent': out.aheadSent,
      'clock-ahead processed': aheadRecords,
      'clock faults counted': `${out.clockFaults[0]} / ${out.clockFaults[1]}`,
    });
  }, 120_000);

  it('archives every message of both streams', () => {
    expect(out.acked).toEqual(out.sent);
    expect(out.archived).toEqual(out.sent);
  });

  it('counts exactly the messages later than the lateness as late', () => {
    // The 12 held-back lagoon CTD samples are late in both runs; a pressure burst, stamped at its start and
    // sent at its end, counts by its last sample and is not late. The shuffle stays within the lateness, so
    // it makes no message late. Both runs follow the watermark rule exactly.
    expect(out.late[0]).toBe(out.expectedLate[0]);
    expect(out.late[1]).toBe(out.expectedLate[1]);
    expect(out.expectedLate[0]).toBeGreaterThanOrEqual(12);
    expect(out.expectedLate[1]).toBe(out.expectedLate[0]);
  });

  it('flags a sensor clock running ahead as a timing fault and derives nothing from it', () => {
    expect(out.aheadRecords).toBe(0);
    expect(out.clockFaults).toEqual([5, 5]);
  });

  // The processor holds messages within the lateness and derives them in event-time order once the
  // watermark passes them, so the delivery order within the lateness does not change any record.
  it('gives the same flux records shuffled within the lateness as in order', () => {
    expect(out.displaced).toBeGreaterThan(100);
    expect(out.fluxA.length).toBeGreaterThan(20);
    expect(out.cmp.firstDiff).toBe('');
  });
});
