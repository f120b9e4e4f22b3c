// The replay reader: late samples move to their event time, everything else keeps receive order, the memory
// bound falls back to receive order, and reading stops after the receive time asked for.
import { mkdtemp, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { beforeAll, describe, expect, it } from 'vitest';
import { readArchiveOrdered, type OrderedStats } from './ordered.js';

const iso = (min: number) => new Date(Date.UTC(2026, 6, 14) + min * 60_000).toISOString();
const ctd = (tMin: number, rxMin = tMin) =>
  JSON.stringify({
    topic: 'reef/s/back/ctd/c1',
    rx: iso(rxMin),
    msg: { v: 1, t: iso(tMin), temp_c: 27, sal: 35 },
  });
const bottle = (tMin: number, rxMin: number) =>
  JSON.stringify({
    topic: 'reef/s/back/sample/b1',
    rx: iso(rxMin),
    msg: { v: 1, t: iso(tMin), ta_umol_kg: 2300 },
  });
let dir: string;

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-ordered-'));
  // day 1: sensors every 5 min, one on-time bottle, and a CTD line 3 min late (kept where it was received)
  const day1 = [ctd(0), ctd(5), bottle(7, 7), ctd(10), ctd(12, 16), ctd(15), ctd(20), ctd(25)];
  await writeFile(path.join(dir, 'raw-2026-07-14.ndjson'), `${day1.join('\n')}\n`);
  // two days later, gzip: the lab results of min 11 and 21 (and a rejected line, never moved)
  const late = [
    bottle(21, 3000),
    bottle(11, 3001),
    JSON.stringify({
      topic: 'reef/s/back/sample/b1',
      rx: iso(3002),
      msg: { v: 1, t: iso(1) },
      reject: 'missing_field:ta_umol_kg',
    }),
  ];
  await writeFile(path.join(dir, 'raw-2026-07-16.ndjson.gz'), gzipSync(`${late.join('\n')}\n`));
});

const order = async (opts: Partial<Parameters<typeof readArchiveOrdered>[1]> = {}, stats?: OrderedStats) => {
  const out: string[] = [];
  for await (const e of readArchiveOrdered(
    dir,
    { topicPrefix: 'reef', latenessMs: 10 * 60_000, ...opts },
    stats,
  )) {
    const m = e.line?.msg as { t: string };
    out.push(
      `${e.line?.topic.includes('/sample/') ? 'S' : 'C'}${(Date.parse(m.t) - Date.parse(iso(0))) / 60_000}`,
    );
  }
  return out;
};

describe('readArchiveOrdered', () => {
  it('moves late samples to their event time and keeps every other line in receive order', async () => {
    const stats: OrderedStats = { lateSamples: 0, lateSamplesUnmoved: 0 };
    expect(await order({}, stats)).toEqual([
      'C0',
      'C5',
      'S7',
      'C10',
      'S11',
      'C12',
      'C15',
      'C20',
      'S21',
      'C25',
      'S1',
    ]);
    expect(stats).toEqual({ lateSamples: 2, lateSamplesUnmoved: 0 });
  });

  it('past the memory bound, replays the rest where they were received and counts them', async () => {
    const stats: OrderedStats = { lateSamples: 0, lateSamplesUnmoved: 0 };
    expect(await order({ maxLateSamples: 1 }, stats)).toEqual([
      'C0',
      'C5',
      'S7',
      'C10',
      'C12',
      'C15',
      'C20',
      'S21',
      'C25',
      'S11',
      'S1',
    ]);
    expect(stats).toEqual({ lateSamples: 1, lateSamplesUnmoved: 1 });
  });

  it('stops reading after the receive time asked for (late samples are already known)', async () => {
    expect(await order({ stopAfterRxMs: Date.parse(iso(12)) })).toEqual([
      'C0',
      'C5',
      'S7',
      'C10',
      'S11',
      'S21',
    ]);
  });
});
