// Lab results entered after the deployment are used by the TA budget (docs/contract-v1.md, replay): 48 h
// of the fictional reef's inner transect with 64 bottle pairs (flat and back reef at the same times, every
// 40 min, TA and DIC from the reef model's truth), replayed once with the bottles received on time and
// once with them received 6 h after the end (a later archive day). In file order the late bottles reach
// the processor after their windows closed (0 of 64 used, the behaviour before event-time ordering);
// `reefd replay` moves them to their time and every bottle window uses the TA budget.
import { mkdir, mkdtemp, readFile, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord, type FluxRecord } from '../../libs/contract/index.js';
import { createProcessor, messageFromArchiveLine } from '../../libs/processor/index.js';
import { simulateMessages, type StationTruth } from '../../libs/simulator/index.js';
import { readArchive } from '../../services/archive/index.js';
import { run } from '../../services/cli/commands/replay.js';
import { captureIo } from '../../services/cli/testing.js';
import { LATE_CONFIG } from './inner-transect-config.js';

const START = Date.UTC(2026, 6, 14);
const HOURS = 48;
const END = START + HOURS * 3600_000;
const BOTTLES = 64;

let dir: string;
let cfgFile: string;
let bottleTimes: number[];
const iso = (ms: number) => new Date(ms).toISOString();
const line = (topic: string, rxMs: number, msg: unknown) => JSON.stringify({ topic, rx: iso(rxMs), msg });

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-late-'));
  cfgFile = path.join(dir, 'site.yaml');
  await writeFile(cfgFile, LATE_CONFIG);
  const parsed = parseConfigText(LATE_CONFIG);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  const sim = simulateMessages(parsed.config, {
    startMs: START,
    durationMs: HOURS * 3600_000,
    seed: 5,
    faults: false,
  });
  // The simulator's own 6-hourly bottles are left out: these 64 pairs are the only ones.
  const sensors = sim.messages.filter((m) => !m.topic.includes('/sample/'));
  const truth = new Map<string, StationTruth>();
  for (const r of sim.truth) if (r.kind === 'station') truth.set(`${r.station}|${r.t}`, r);
  bottleTimes = Array.from({ length: BOTTLES }, (_, i) => START + 3600_000 + i * 40 * 60_000);
  const bottles = bottleTimes.flatMap((t) =>
    (['flat', 'back'] as const).map((st) => {
      const w = truth.get(`${st}|${iso(t)}`);
      if (!w) throw new Error(`no truth at ${iso(t)}`);
      return {
        topic: `reef/ornen-reef/${st}/sample/bottle-${st}`,
        tMs: t,
        msg: {
          v: 1,
          t: iso(t),
          ta_umol_kg: w.ta_umol_kg,
          dic_umol_kg: w.dic_umol_kg,
          sal: w.sal,
          temp_c: w.temp_c,
        },
      };
    }),
  );
  const sensorLines = sensors.map((m) => ({ tMs: m.tMs, text: line(m.topic, m.tMs + 250, m.payload) }));
  // on time: bottles in receive order among the sensor lines
  const onTime = [
    ...sensorLines,
    ...bottles.map((b) => ({ tMs: b.tMs, text: line(b.topic, b.tMs + 250, b.msg) })),
  ].sort((a, b) => a.tMs - b.tMs);
  await mkdir(path.join(dir, 'ontime'));
  await writeFile(
    path.join(dir, 'ontime', 'raw-2026-07-14.ndjson'),
    onTime.map((l) => l.text).join('\n') + '\n',
  );
  // late: all bottles received 6 h after the end, in the next day's file
  await mkdir(path.join(dir, 'late'));
  await writeFile(
    path.join(dir, 'late', 'raw-2026-07-14.ndjson'),
    sensorLines.map((l) => l.text).join('\n') + '\n',
  );
  const rxLate = END + 6 * 3600_000;
  await writeFile(
    path.join(dir, 'late', 'raw-2026-07-16.ndjson'),
    bottles.map((b, i) => line(b.topic, rxLate + i * 1000, b.msg)).join('\n') + '\n',
  );
}, 120_000);

async function replay(
  input: string,
  extra: string[] = [],
): Promise<{ records: DerivedRecord[]; summary: Record<string, unknown> }> {
  const out = path.join(dir, `${path.basename(input)}-${extra.join('_').replace(/[^a-z0-9]/gi, '')}.ndjson`);
  const sum = `${out}.summary.json`;
  const io = captureIo();
  const code = await run(
    [
      '--config',
      cfgFile,
      '--input',
      input,
      '--out',
      out,
      '--summary-json',
      sum,
      '--quiet',
      '--flush-tail',
      ...extra,
    ],
    io,
  );
  expect(code, io.text().stderr).toBe(0);
  const text = await readFile(out, 'utf8');
  return {
    records:
      text.trim() === ''
        ? []
        : text
            .trim()
            .split('\n')
            .map((l) => JSON.parse(l) as DerivedRecord),
    summary: JSON.parse(await readFile(sum, 'utf8')) as Record<string, unknown>,
  };
}

/** Bottle times whose windows (every flux window holding the bottle) used the TA budget, and those windows. */
function taUse(records: readonly DerivedRecord[]): { bottles: number; windows: number; ta: number } {
  const flux = records.filter((r): r is FluxRecord => r.type === 'flux' && r.transect === 'inner');
  let bottles = 0;
  let windows = 0;
  let ta = 0;
  for (const t of bottleTimes) {
    // a window of 30 min centred on r.t holds the bottle when |r.t - t| < 15 min (start inclusive)
    const holding = flux.filter(
      (r) => Date.parse(r.t) - 15 * 60_000 <= t && t < Date.parse(r.t) + 15 * 60_000,
    );
    windows += holding.length;
    const used = holding.filter((r) => r.nec_method === 'ta').length;
    ta += used;
    if (holding.length > 0 && used === holding.length) bottles++;
  }
  return { bottles, windows, ta };
}

describe('late lab results in replay', () => {
  it('on time: every bottle window uses the TA budget (64 of 64)', async () => {
    const r = await replay(path.join(dir, 'ontime'));
    const u = taUse(r.records);
    expect(u.bottles).toBe(BOTTLES);
    expect(u.windows).toBe(3 * BOTTLES); // a 30-min window every 10 min holds each bottle three times
    expect(u.ta).toBe(u.windows);
    expect(r.summary.lateSamplesMoved).toBe(0);
  }, 120_000);

  it('in receive order (the processor fed file by file) the late bottles are used by no window', async () => {
    const parsed = parseConfigText(LATE_CONFIG);
    if (!parsed.ok) throw new Error('config');
    const p = createProcessor(parsed.config);
    const records: DerivedRecord[] = [];
    for await (const e of readArchive(path.join(dir, 'late'))) {
      if (!e.line) continue;
      const m = messageFromArchiveLine(parsed.config, e.line);
      if (m.ok) records.push(...p.push(m.message, m.rxMs).records);
    }
    records.push(...p.drain());
    expect(taUse(records).bottles).toBe(0);
  }, 120_000);

  it('received 6 h after the end: reefd replay uses them all the same (64 of 64, identical fluxes)', async () => {
    const late = await replay(path.join(dir, 'late'));
    const onTime = await replay(path.join(dir, 'ontime'));
    expect(late.summary.lateSamplesMoved).toBe(2 * BOTTLES);
    const u = taUse(late.records);
    expect(u.bottles).toBe(BOTTLES);
    expect(u.ta).toBe(u.windows);
    const fluxOf = (rs: DerivedRecord[]) => rs.filter((r) => r.type === 'flux').map((r) => JSON.stringify(r));
    expect(fluxOf(late.records)).toEqual(fluxOf(onTime.records));
  }, 120_000);

  it('--from/--to give the records of a full replay within the range', async () => {
    const full = await replay(path.join(dir, 'late'));
    const from = iso(START + 20 * 3600_000);
    const to = iso(START + 26 * 3600_000);
    const part = await replay(path.join(dir, 'late'), ['--from', from, '--to', to]);
    const inRange = (r: DerivedRecord) => r.t >= from && r.t < to;
    const key = (r: DerivedRecord) => JSON.stringify(r);
    const want = full.records.filter((r) => inRange(r) && r.type !== 'alert');
    const got = part.records.filter((r) => r.type !== 'alert');
    expect(got.length).toBeGreaterThan(100);
    expect(part.records.every(inRange)).toBe(true);
    // Flux windows chain the inverse's storage state from one window to the next through the whole run
    // (docs/methods/metabolism.md 6.5), so a range started from its warm-up reaches the full run's NEC to
    // rounding only (the chain forgets its start by tau/(tau + 2W) per window): equal to 1e-8 relative.
    const flux = (rs: DerivedRecord[]) => rs.filter((r) => r.type === 'flux') as Record<string, unknown>[];
    const gf = flux(got);
    const wf = flux(want);
    expect(gf.map((r) => r.t)).toEqual(wf.map((r) => r.t));
    let worstRel = 0;
    gf.forEach((a, i) => {
      const b = wf[i] as Record<string, unknown>;
      expect(Object.keys(a).sort()).toEqual(Object.keys(b).sort());
      for (const k of Object.keys(b)) {
        const x = a[k];
        const y = b[k];
        if (typeof x === 'number' && typeof y === 'number') {
          const rel = Math.abs(x - y) / Math.max(1e-9, Math.abs(y));
          worstRel = Math.max(worstRel, rel);
        } else expect(x, `${String(b.t)} ${k}`).toEqual(y);
      }
    });
    expect(worstRel).toBeLessThan(1e-8);
    const rest = (rs: DerivedRecord[]) => rs.filter((r) => r.type !== 'flux').map(key);
    expect(rest(got)).toEqual(rest(want));
    expect(part.summary.outOfRange as number).toBeGreaterThan(1000);
  }, 120_000);

  it('refuses a bad range with exit 2', async () => {
    for (const [args, msg] of [
      [['--from', '2026-07-14'], /--from 2026-07-14 is not an ISO 8601 time with a zone/],
      [['--from', '2026-07-15T00:00:00Z', '--to', '2026-07-14T00:00:00Z'], /must be before --to/],
    ] as const) {
      const io = captureIo();
      expect(await run(['--config', cfgFile, '--input', path.join(dir, 'late'), ...args], io)).toBe(2);
      expect(io.text().stderr).toMatch(msg);
    }
  });
});
