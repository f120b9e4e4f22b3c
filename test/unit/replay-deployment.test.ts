// `reefd replay` over a day of the fictional deployment with its scripted faults (libs/simulator): the
// output carries the alert records of those faults and events, and a second replay is byte-identical.
import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord } from '../../libs/contract/index.js';
import { simulateMessages, type TruthRow } from '../../libs/simulator/index.js';
import { run } from '../../services/cli/commands/replay.js';
import { captureIo } from '../../services/cli/testing.js';

const CONFIG = path.resolve('deploy/demo/ornen-reef.yaml');
const START = Date.UTC(2026, 2, 1);
let dir: string;
let records: DerivedRecord[];
let truth: TruthRow[];
let firstOut: string;
let summary: Record<string, unknown>;

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-replay-'));
  const parsed = parseConfigText(await readFile(CONFIG, 'utf8'));
  if (!parsed.ok) throw new Error('demo config invalid');
  const sim = simulateMessages(parsed.config, { startMs: START, durationMs: 24 * 3600_000, seed: 11 });
  truth = sim.truth;
  const lines = sim.messages.map((m) =>
    JSON.stringify({ topic: m.topic, rx: new Date(m.tMs + 250).toISOString(), msg: m.payload }),
  );
  // A hostile line, a truncated one and a rejected message: the replay reads on and counts them.
  lines.splice(
    100,
    0,
    '{"topic":"reef/ornen-reef/crest/ctd/ctd-crest","rx":"2026-03-01T00:30:00Z","msg":{"v":1,"t":"2026-03-01T00:30:00Z","temp_c":"hot","sal":35}}',
  );
  lines.splice(200, 0, '{"topic":"reef/ornen-reef/crest/ctd/ctd-cr');
  await writeFile(path.join(dir, 'raw-2026-03-01.ndjson.gz'), gzipSync(lines.join('\n') + '\n'));
  const io = captureIo();
  const code = await run(
    [
      '--config',
      CONFIG,
      '--input',
      dir,
      '--out',
      path.join(dir, 'out1.ndjson'),
      '--summary-json',
      path.join(dir, 's.json'),
    ],
    io,
  );
  expect(code, io.text().stderr).toBe(0);
  firstOut = await readFile(path.join(dir, 'out1.ndjson'), 'utf8');
  records = firstOut
    .trim()
    .split('\n')
    .map((l) => JSON.parse(l) as DerivedRecord);
  summary = JSON.parse(await readFile(path.join(dir, 's.json'), 'utf8')) as Record<string, unknown>;
}, 120_000);

const alerts = () => records.filter((r) => r.type === 'alert');
const raised = (rule: string, sensor?: string) =>
  alerts().filter(
    (a) => a.rule === rule && a.state === 'raised' && (sensor === undefined || a.sensor === sensor),
  );

describe('replay of a deployment with faults', () => {
  it('reads the gzip archive and counts the bad lines without stopping', () => {
    expect(summary.unreadable).toBe(1);
    expect(summary.rejected).toBe(1);
    expect((summary.rejectsByReason as Record<string, number>).wrong_type).toBe(1);
    expect(summary.accepted as number).toBeGreaterThan(4000);
  });

  it('raises and clears stale for the CTD the scenario silences', () => {
    const f = truth.find((t) => t.kind === 'fault' && t.fault === 'stale');
    expect(f).toBeDefined();
    const sensor = (f as { sensor: string }).sensor;
    expect(raised('stale', sensor).length).toBe(1);
    expect(alerts().some((a) => a.rule === 'stale' && a.sensor === sensor && a.state === 'cleared')).toBe(
      true,
    );
  });

  it('raises a spike fault for each scripted spike', () => {
    for (const f of truth.filter((t) => t.kind === 'fault' && t.fault === 'spike')) {
      expect(raised('spike', (f as { sensor: string }).sensor).length, JSON.stringify(f)).toBe(1);
    }
  });

  it('raises the battery fault for the failing supply', () => {
    const f = truth.find((t) => t.kind === 'fault' && t.fault === 'battery') as
      { sensor: string } | undefined;
    expect(f).toBeDefined();
    expect(raised('battery', f!.sensor).length).toBe(1);
  });

  it('catches the frozen pCO2 sensor within 60 min (repeat test) and derives nothing valid from it after', () => {
    const f = truth.find((t) => t.kind === 'fault' && t.fault === 'flatline') as
      { sensor: string; station: string; startMs: number; endMs: number } | undefined;
    expect(f).toBeDefined();
    const a = raised('flatline', f!.sensor);
    expect(a.length).toBe(1);
    expect(Date.parse(a[0]!.t) - f!.startMs).toBeLessThanOrEqual(60 * 60_000);
    expect(Date.parse(a[0]!.t)).toBeGreaterThan(f!.startMs);
    // Once flagged, its readings fail QC: no carbonate record of it passes as good until it moves again.
    const during = records.filter(
      (r) =>
        r.type === 'carbonate' &&
        r.sensor === f!.sensor &&
        Date.parse(r.t) >= Date.parse(a[0]!.t) &&
        Date.parse(r.t) < f!.endMs,
    );
    for (const r of during) expect(r.flag).toBeGreaterThanOrEqual(3);
  });

  it('raises low oxygen in the lagoon on the hypoxic night and clears it after (contract defaults)', () => {
    const low = raised('low_oxygen');
    expect(low.length).toBe(1);
    expect(low[0]!.station).toBe('lagoon');
    expect(low[0]!.limit).toBe(2);
    expect(alerts().some((a) => a.rule === 'low_oxygen' && a.state === 'cleared')).toBe(true);
    // the raise needs 10 min below 2 mg/L: the first oxygen record below the limit is at least 10 min earlier
    const below = records.find(
      (r) => r.type === 'oxygen' && r.station === 'lagoon' && (r.o2_mg_l as number) < 2,
    );
    expect(Date.parse(low[0]!.t) - Date.parse(below!.t)).toBeGreaterThanOrEqual(10 * 60_000);
  });

  it('does not flap: each episode is raised once and cleared at most once', () => {
    const byId = new Map<string, string[]>();
    for (const a of alerts()) byId.set(String(a.id), [...(byId.get(String(a.id)) ?? []), a.state]);
    for (const [id, states] of byId) {
      expect(states[0], id).toBe('raised');
      expect(states.filter((s) => s === 'raised').length, id).toBe(1);
      expect(states.length, id).toBeLessThanOrEqual(2);
    }
    expect(alerts().length).toBeLessThan(40);
  });

  it('gives byte-identical output on a second replay', async () => {
    const io = captureIo();
    expect(
      await run(['--config', CONFIG, '--input', dir, '--out', path.join(dir, 'out2.ndjson'), '--quiet'], io),
    ).toBe(0);
    expect(await readFile(path.join(dir, 'out2.ndjson'), 'utf8')).toBe(firstOut);
  }, 60_000);

  it('exits 2 on unusable arguments', async () => {
    expect(await run(['--config', CONFIG], captureIo())).toBe(2);
    expect(await run(['--config', CONFIG, '--input', path.join(dir, 'missing')], captureIo())).toBe(2);
    expect(await run(['--input', dir], captureIo())).toBe(2);
  });
});
