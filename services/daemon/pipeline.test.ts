// The intake: archive before acknowledgement, rejects to the dead letters, and a broker's redelivery of an
// archived message archived once (fault case b found copies in the archive after a broker restart).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import type { ArchiveWriter, DeadLetter, DeadLetterSink, RawInput } from '../pipeline/types.js';
import { createPipeline, redeliveryKey } from './pipeline.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config');
const config = parsed.config;

/** An archive whose fsync the test releases by hand. */
function heldArchive() {
  const lines: string[] = [];
  const waiting: (() => void)[] = [];
  const archive: ArchiveWriter = {
    append: (line) =>
      new Promise<void>((resolve) => {
        lines.push(line);
        waiting.push(resolve);
      }),
    flush: async () => undefined,
    close: async () => undefined,
  };
  return { archive, lines, sync: () => waiting.splice(0).forEach((r) => r()) };
}

function input(topic: string, body: object, acks: string[], tag: string, redelivered = false): RawInput {
  return {
    topic,
    payload: new TextEncoder().encode(JSON.stringify(body)),
    rxMs: Date.UTC(2026, 2, 1, 0, 1),
    ack: () => acks.push(tag),
    ...(redelivered ? { redelivered: true } : {}),
  };
}

describe('intake pipeline', () => {
  const ctd = { v: 1, t: '2026-03-01T00:00:00Z', temp_c: 27.1, sal: 35.2 };
  const topic = 'reef/ornen-reef/crest/ctd/ctd-crest';

  it('acknowledges only after the archive line is durable', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const p = createPipeline({ config, processor: createProcessor(config), archive: a.archive, sinks: [] });
    const done = p.handle(input(topic, ctd, acks, 'first'));
    await Promise.resolve();
    expect(acks).toEqual([]);
    a.sync();
    await done;
    expect(acks).toEqual(['first']);
    expect(a.lines).toHaveLength(1);
  });

  it('archives a redelivered message once and acknowledges both deliveries', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const p = createPipeline({ config, processor: createProcessor(config), archive: a.archive, sinks: [] });
    const one = p.handle(input(topic, ctd, acks, 'first'));
    const two = p.handle(input(topic, ctd, acks, 'again', true));
    a.sync();
    await Promise.all([one, two]);
    expect(a.lines).toHaveLength(1);
    expect(acks.sort()).toEqual(['again', 'first']);
    expect(p.stats().redeliveries).toBe(1);
    // a different message on the same topic is new
    await Promise.all([
      p.handle(input(topic, { ...ctd, t: '2026-03-01T00:05:00Z' }, acks, 'next')),
      Promise.resolve(a.sync()),
    ]);
  });

  it('recognises a message of the archive tail after a restart (same key from the stored, parsed form)', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const p = createPipeline({ config, processor: createProcessor(config), archive: a.archive, sinks: [] });
    // the archive stores the payload parsed: whitespace and key order of the wire form do not matter
    p.rememberArchived([redeliveryKey(topic, '', JSON.parse(JSON.stringify(ctd)))]);
    const raw: RawInput = {
      topic,
      payload: new TextEncoder().encode(JSON.stringify(ctd, null, 2)),
      rxMs: 1,
      ack: () => acks.push('r'),
      redelivered: true,
    };
    await p.handle(raw);
    expect(a.lines).toHaveLength(0);
    expect(acks).toEqual(['r']);
  });

  it('archives the same bytes twice when the source does not mark a redelivery (two messages)', async () => {
    const a = heldArchive();
    const p = createPipeline({ config, processor: createProcessor(config), archive: a.archive, sinks: [] });
    const bad = { v: 1, t: 'x' };
    const one = p.handle(input(topic, bad, [], '1'));
    const two = p.handle(input(topic, bad, [], '2'));
    a.sync();
    await Promise.all([one, two]);
    expect(a.lines).toHaveLength(2);
  });

  it('sends rejects to the dead letters with their reason, archived with it', async () => {
    const a = heldArchive();
    const letters: DeadLetter[] = [];
    const dl: DeadLetterSink = {
      write: (l) => void letters.push(l),
      flush: async () => undefined,
      close: async () => undefined,
      suppressed: () => 0,
    };
    const p = createPipeline({
      config,
      processor: createProcessor(config),
      archive: a.archive,
      sinks: [],
      deadLetter: dl,
    });
    const done = p.handle(input(topic, { ...ctd, sal: 99 }, [], 'bad'));
    a.sync();
    await done;
    expect(letters.map((l) => l.reason)).toEqual(['out_of_range:sal']);
    expect(JSON.parse(a.lines[0]!).reject).toBe('out_of_range:sal');
  });
});
