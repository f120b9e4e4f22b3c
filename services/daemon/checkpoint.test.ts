// The checkpoint made in pieces: joined, the pieces are exactly JSON.stringify of the same value (a property
// over random objects, and the state of a processor that ran six hours of a test deployment), the event loop
// is given back between them, and the file reads back as the state it was made from.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { deploymentMessages, startDeployment } from '../../libs/processor/test-helpers.js';
import { readCheckpoint, writeCheckpoint } from './checkpoint.js';
import { newStream } from './cursor.js';
import { stringifyInPieces, type Pacing } from './json-pieces.js';

const dir = mkdtempSync(path.join(os.tmpdir(), 'reefd-cp-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Pacing that yields after every piece and counts the yields (a microtask: no clock, no timer). */
function counting(depth: number): Pacing & { yields: number } {
  const p = { depth, sliceMs: 0, yields: 0, yieldNow: async () => void p.yields++, nowMs: () => 0 };
  return p;
}

function ranState() {
  const { processor, feed } = startDeployment();
  feed(deploymentMessages(6, { bottlesAt: [] }));
  return processor;
}

describe('JSON in pieces', () => {
  it('joins to JSON.stringify for any object, at any depth', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.object({ maxDepth: 4, withNullPrototype: true }),
        fc.integer({ min: 0, max: 5 }),
        async (v, depth) => {
          const pieces = await stringifyInPieces(v, counting(depth));
          expect(pieces.join('')).toBe(JSON.stringify(v));
        },
      ),
    );
  });

  it('leaves out what JSON.stringify leaves out and calls toJSON below the walked levels', async () => {
    const v = {
      a: undefined,
      b: () => 1,
      c: { d: undefined, e: new Date(0), f: [undefined, NaN, -0], 'g"h': {} },
      i: Symbol('x'),
    };
    for (const depth of [0, 1, 2, 3]) {
      const pieces = await stringifyInPieces(v, counting(depth));
      expect(pieces.join('')).toBe('{"c":{"e":"1970-01-01T00:00:00.000Z","f":[null,null,0],"g\\"h":{}}}');
    }
  });

  it("gives the loop back between pieces of a processor's state and makes its JSON exactly", async () => {
    const processor = ranState();
    const live = processor.snapshot({ copy: false });
    const pacing = counting(3);
    const pieces = await stringifyInPieces(live, pacing);
    expect(pieces.join('')).toBe(JSON.stringify(processor.snapshot()));
    // At least one yield per station series (two stations and a mast, a dozen series each).
    expect(pacing.yields).toBeGreaterThan(30);
  });
});

describe('checkpoint file', () => {
  it('reads back as the state and stream it was written from', async () => {
    const processor = ranState();
    const stream = newStream('fp');
    stream.nextPos = 1234;
    stream.cursor = { rxMs: 1_700_000_000_000, atRx: 2, lines: 99 };
    const file = path.join(dir, 'checkpoint.json');
    await writeCheckpoint(file, processor.snapshot({ copy: false }), stream, { silence: { lastMs: 5 } });
    const back = await readCheckpoint(file);
    expect(back.warning).toBeUndefined();
    expect(back.state).toEqual(processor.snapshot());
    expect(back.stream).toEqual(stream);
    expect(back.silence).toEqual({ lastMs: 5 });
    const text = readFileSync(file, 'utf8');
    const savedAt = (JSON.parse(text) as { savedAt: string }).savedAt;
    expect(text).toBe(
      JSON.stringify({ savedAt, stream, silence: { lastMs: 5 }, state: processor.snapshot() }),
    );
  });

  it('is written in more than one batch when large, still as one JSON document', async () => {
    const processor = ranState();
    // Pad the state's text past two write batches (1 Mi characters each) with a big member.
    const big = { ...processor.snapshot(), padding: 'x'.repeat(2_500_000) };
    const stream = newStream('fp');
    const file = path.join(dir, 'big.json');
    await writeCheckpoint(file, big, stream);
    const text = readFileSync(file, 'utf8');
    const savedAt = (JSON.parse(text) as { savedAt: string }).savedAt;
    expect(text).toBe(JSON.stringify({ savedAt, stream, state: big }));
    expect(text.length).toBeGreaterThan(2 * (1 << 20));
  });
});
