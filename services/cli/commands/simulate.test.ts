import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startEmbeddedBroker, type EmbeddedBroker } from '../../broker/embedded.js';
import type { CliIo } from '../io.js';
import { run } from './simulate.js';

const demo = fileURLToPath(new URL('../../../deploy/demo/ornen-reef.yaml', import.meta.url));
function capture(): CliIo & { out: string; err: string } {
  const io = { out: '', err: '', env: {}, isTty: false } as CliIo & { out: string; err: string };
  io.stdout = (s) => void (io.out += s);
  io.stderr = (s) => void (io.err += s);
  return io;
}

let broker: EmbeddedBroker;
beforeAll(async () => {
  broker = await startEmbeddedBroker('127.0.0.1', 0);
});
afterAll(async () => broker.close());

describe('reefd simulate', () => {
  it('publishes half an hour of the demo reef at --speed max and exits 0', async () => {
    const io = capture();
    const code = await run(
      [
        '--config',
        demo,
        '--broker',
        broker.url,
        '--speed',
        'max',
        '--duration',
        '0.5',
        '--start',
        '2026-03-01T00:00:00Z',
        '--log-level',
        'silent',
      ],
      io,
    );
    expect(code).toBe(0);
    expect(io.err).toMatch(/published \d+ messages up to 2026-03-01T00:/);
  });
  it('exits 2 with the reason for bad options', async () => {
    const io = capture();
    expect(await run(['--config', demo, '--speed', 'fast'], io)).toBe(2);
    expect(io.err).toContain('--speed must be a positive number or "max"');
    const io2 = capture();
    expect(await run(['--speed', 'max'], io2)).toBe(2);
    expect(io2.err).toContain('--config FILE is required');
  });
});
