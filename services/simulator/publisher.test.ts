import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import mqtt from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type ReefdConfig } from '../../libs/contract/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { startEmbeddedBroker, type EmbeddedBroker } from '../broker/embedded.js';
import { publishSimulation } from './publisher.js';

const quiet = { info() {}, warn() {}, error() {}, debug() {} };
let broker: EmbeddedBroker;
let config: ReefdConfig;
let dir: string;

beforeAll(async () => {
  broker = await startEmbeddedBroker('127.0.0.1', 0);
  const r = parseConfigText(
    readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
  );
  if (!r.ok) throw new Error('demo config invalid');
  config = r.config;
  dir = mkdtempSync(path.join(tmpdir(), 'reefd-sim-'));
});
afterAll(async () => {
  await broker.close();
  rmSync(dir, { recursive: true, force: true });
});

describe('publishSimulation', () => {
  it('publishes exactly the generated messages to a real broker and writes the truth', async () => {
    const opts = { startMs: Date.UTC(2026, 2, 1), durationMs: 2 * 3.6e6, seed: 5 };
    const expected = simulateMessages(config, opts);
    const sub = await mqtt.connectAsync(broker.url, { protocolVersion: 4 });
    const got: { topic: string; text: string }[] = [];
    sub.on('message', (topic, payload) => got.push({ topic, text: payload.toString('utf8') }));
    await sub.subscribeAsync('reef/#', { qos: 1 });
    const truthPath = path.join(dir, 'truth.ndjson');
    const summary = await publishSimulation({
      config,
      brokerUrl: broker.url,
      speed: 'max',
      logger: quiet,
      truthPath,
      ...opts,
    });
    for (let i = 0; i < 100 && got.length < expected.messages.length; i++)
      await new Promise((r) => setTimeout(r, 50));
    await sub.endAsync();
    expect(summary.messages).toBe(expected.messages.length);
    expect(got.length).toBe(expected.messages.length);
    expect(got.map((g) => g.topic)).toEqual(expected.messages.map((m) => m.topic));
    for (const g of got) expect(parseMessage(g.topic, g.text).ok).toBe(true);
    const lines = readFileSync(truthPath, 'utf8').trim().split('\n');
    expect(lines.length).toBe(expected.truth.length);
    expect(JSON.parse(lines.at(-1) as string)).toEqual(expected.truth.at(-1));
  });

  it('paces an accelerated run by the wall clock: 60x plays an hour in a minute', async () => {
    let wall = 1_000_000;
    const waits: number[] = [];
    const summary = await publishSimulation({
      config,
      brokerUrl: broker.url,
      speed: 60,
      seed: 5,
      startMs: Date.UTC(2026, 2, 1),
      durationMs: 3.6e6,
      logger: quiet,
      now: () => wall,
      sleep: async (ms) => {
        waits.push(ms);
        wall += ms;
      },
    });
    expect(summary.messages).toBeGreaterThan(100);
    // The last message of the hour is due just under 60 s of wall time after the start.
    expect(wall - 1_000_000).toBeGreaterThan(55_000);
    expect(wall - 1_000_000).toBeLessThanOrEqual(60_000);
    expect(waits.every((w) => w > 0)).toBe(true);
  });

  it('with notAheadOfWallClock, catches up at speed and then follows the wall clock', async () => {
    const startMs = Date.UTC(2026, 2, 1);
    let wall = startMs + 30 * 60_000; // the run starts half an hour in the past
    const summary = await publishSimulation({
      config,
      brokerUrl: broker.url,
      speed: 60,
      seed: 5,
      startMs,
      durationMs: 3.6e6,
      notAheadOfWallClock: true,
      logger: quiet,
      now: () => wall,
      sleep: async (ms) => {
        wall += ms;
      },
    });
    expect(summary.messages).toBeGreaterThan(100);
    // The simulated hour ends an hour after its start, so the wall clock ends there too, never before.
    expect(wall).toBeGreaterThanOrEqual(summary.lastTMs);
    expect(wall - summary.lastTMs).toBeLessThan(60_000);
  });

  it('fails at once for a broker that is not there', async () => {
    await expect(
      publishSimulation({
        config,
        brokerUrl: 'mqtt://127.0.0.1:1',
        speed: 'max',
        seed: 1,
        startMs: 0,
        durationMs: 1,
        logger: quiet,
      }),
    ).rejects.toThrow();
  });
});
