import { describe, it, expect, afterEach } from 'vitest';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pino from 'pino';
import { createDeadLetterSink, type TopicPublisher } from './dead-letter.js';

const dirs: string[] = [];
afterEach(async () => {
  for (const d of dirs.splice(0)) await rm(d, { recursive: true, force: true });
});

const letter = (i: number) => ({
  topic: 'reef/s/st/ctd/c1',
  rxMs: Date.UTC(2026, 11, 2) + i,
  reason: 'range:sal',
  payload: `{"i":${i}}`,
});

describe('dead-letter output', () => {
  it('passes max_per_min letters, counts the rest and writes one summary line', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-dl-'));
    dirs.push(dir);
    let now = Date.UTC(2026, 11, 2);
    const published: string[] = [];
    const publisher: TopicPublisher = {
      publish: async (topic, payload) => void published.push(`${topic} ${payload}`),
    };
    const path = join(dir, 'dead.ndjson');
    const dl = await createDeadLetterSink({
      path,
      mqtt: { publisher, topic: 'reefd/dead' },
      maxPerMin: 10,
      clock: () => now,
      logger: pino({ level: 'silent' }),
      summaryEveryMs: 0,
    });
    for (let i = 0; i < 25; i++) dl.write(letter(i));
    expect(dl.suppressed()).toBe(15);
    // Half a minute later the bucket has 5 tokens again (10 per minute, refilled evenly).
    now += 30_000;
    for (let i = 25; i < 33; i++) dl.write(letter(i));
    expect(dl.suppressed()).toBe(18);
    await dl.close();
    const lines = (await readFile(path, 'utf8'))
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as Record<string, unknown>);
    expect(lines.length).toBe(16);
    expect(lines.slice(0, 15).map((l) => l.payload)).toEqual([
      ...Array.from({ length: 10 }, (_, i) => `{"i":${i}}`),
      ...Array.from({ length: 5 }, (_, i) => `{"i":${25 + i}}`),
    ]);
    expect(lines[0]).toEqual({
      topic: 'reef/s/st/ctd/c1',
      rx: '2026-12-02T00:00:00.000Z',
      reason: 'range:sal',
      payload: '{"i":0}',
    });
    expect(lines[15]).toMatchObject({ summary: '18 suppressed', suppressed: 18 });
    expect(published.length).toBe(16);
    expect(published[0]?.startsWith('reefd/dead {"topic"')).toBe(true);
  });

  it('writes no summary when nothing was suppressed, and survives a failing publisher', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-dl-'));
    dirs.push(dir);
    const path = join(dir, 'dead.ndjson');
    const dl = await createDeadLetterSink({
      path,
      kafka: { publisher: { publish: () => Promise.reject(new Error('broker down')) }, topic: 'dead' },
      maxPerMin: 100,
      clock: () => 0,
      logger: pino({ level: 'silent' }),
    });
    dl.write(letter(1));
    await dl.close();
    const text = await readFile(path, 'utf8');
    expect(text.trim().split('\n').length).toBe(1);
    expect(dl.suppressed()).toBe(0);
  });
});
