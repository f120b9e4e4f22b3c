// Archive lines spliced from the received bytes: byte for byte the line archiveLine() writes for a payload
// in JSON.stringify's form, and for any other JSON text one line whose `msg` reads back as the payload's
// value; payloads that are not JSON keep the string form.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { archiveLine, parseArchiveLine, parseMessage, parseTopic } from '../../libs/contract/index.js';
import { archiveLineBytes, parsedAsJson } from './line.js';

const RX = Date.UTC(2026, 11, 2, 6, 0, 0, 123);
const rxIso = new Date(RX).toISOString();
const topics = fc.constantFrom(
  'reef/demo-reef/crest/ctd/ctd-1',
  'reef/s/a/pressure/p',
  'reef/"odd"/\u00e9/x/y',
);
const reasons = fc.option(fc.constantFrom('out_of_range:temp_c', 'unknown_station', 'caf\u00e9"\\'), {
  nil: undefined,
});
const enc = (s: string) => Buffer.from(s, 'utf8');

/** Reads a line back the way the replay reader does. */
function readBack(buf: Buffer): { msg: unknown; reject?: string | undefined } {
  const text = buf.toString('utf8');
  expect(text).not.toMatch(/[\n\r]/);
  const r = parseArchiveLine(text);
  if (!r.ok) throw new Error(`line does not parse: ${r.reason}: ${text.slice(0, 200)}`);
  return r.line;
}

describe('archiveLineBytes', () => {
  it('equals archiveLine byte for byte for a payload in JSON.stringify form', () => {
    fc.assert(
      fc.property(topics, fc.jsonValue(), reasons, (topic, value, reject) => {
        const text = JSON.stringify(value);
        const spliced = archiveLineBytes({ topic, rxMs: RX, payload: enc(text), json: true, reject });
        expect(spliced.toString('utf8')).toBe(archiveLine(topic, rxIso, text, reject));
      }),
      { numRuns: 1000 },
    );
  });

  it('keeps any JSON text as one line whose msg is the payload value (indentation, CR LF, escapes)', () => {
    const layout = fc.constantFrom<[number | string, string]>([0, ''], [2, '\n'], ['\t', '\r\n'], [1, '\r']);
    fc.assert(
      fc.property(topics, fc.jsonValue(), layout, reasons, (topic, value, [indent, nl], reject) => {
        const text = JSON.stringify(value, null, indent).replace(/\n/g, nl);
        const spliced = archiveLineBytes({ topic, rxMs: RX, payload: enc(` ${text}\n`), json: true, reject });
        const back = readBack(spliced);
        expect(back.msg).toStrictEqual(JSON.parse(text));
        expect(back.reject).toBe(reject);
      }),
      { numRuns: 1000 },
    );
  });

  it('keeps what re-serialising lost: -0, a number past double range, exponents, escapes', () => {
    const text = '{"a":-0,"b":1e400,"c":2.50E+1,"d":"\\u00e9\\n","e":12345678901234567890}';
    const back = readBack(
      archiveLineBytes({ topic: 'reef/s/a/ctd/c', rxMs: RX, payload: enc(text), json: true }),
    );
    expect(back.msg).toStrictEqual(JSON.parse(text));
    expect(Object.is((back.msg as { a: number }).a, -0)).toBe(true);
    expect((back.msg as { b: number }).b).toBe(Infinity);
    // The re-serialised line turned 1e400 into null and -0 into 0.
    expect(readBack(Buffer.from(archiveLine('reef/s/a/ctd/c', rxIso, text))).msg).toMatchObject({
      a: 0,
      b: null,
    });
  });

  it('drops a UTF-8 byte order mark, as the intake decoder does', () => {
    const payload = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), enc('{"v":1,"t":"x"}')]);
    expect(
      readBack(archiveLineBytes({ topic: 'reef/s/a/ctd/c', rxMs: RX, payload, json: true })).msg,
    ).toEqual({
      v: 1,
      t: 'x',
    });
  });

  it('stores a payload that is not JSON as its text, as archiveLine does', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 200 }), reasons, (bytes, reject) => {
        const spliced = archiveLineBytes({
          topic: 'reef/s/a/ctd/c',
          rxMs: RX,
          payload: bytes,
          json: false,
          reject,
        });
        const text = new TextDecoder('utf-8', { fatal: false }).decode(bytes);
        expect(spliced.toString('utf8')).toBe(archiveLine('reef/s/a/ctd/c', rxIso, text, reject));
      }),
      { numRuns: 500 },
    );
  });
});

describe('parsedAsJson', () => {
  const strict = new TextDecoder('utf-8', { fatal: true });
  /** The truth: valid UTF-8 and JSON.parse accepts the text, the topic is valid and the size within bounds. */
  function isJson(topic: string, bytes: Uint8Array): boolean {
    if (!parseTopic(topic, 'reef').ok) return false;
    if (bytes.length > 512 * 1024) return false;
    try {
      JSON.parse(strict.decode(bytes));
      return true;
    } catch {
      return false;
    }
  }
  const topicsAll = fc.constantFrom(
    'reef/s/a/ctd/c',
    'reef/s/a/nokind/c',
    'bad/topic',
    'reef/s/a/pressure/p',
  );
  const payloads = fc.oneof(
    fc.uint8Array({ maxLength: 64 }),
    fc.jsonValue().map((v) => enc(JSON.stringify(v))),
    fc.constantFrom(
      enc('{"v":1,"t":"2026-03-01T06:00:00Z","temp_c":27,"sal":35}'),
      enc(' [1, 2] '),
      enc('"x"'),
    ),
  );
  it('is true exactly when the intake parsed the payload as JSON', () => {
    fc.assert(
      fc.property(topicsAll, payloads, (topic, bytes) => {
        expect(parsedAsJson(parseMessage(topic, bytes))).toBe(isJson(topic, bytes));
      }),
      { numRuns: 2000 },
    );
  });
  it('is false for a payload over the size limit, even when it is JSON', () => {
    const big = enc(JSON.stringify({ v: 1, pad: 'x'.repeat(600 * 1024) }));
    expect(parsedAsJson(parseMessage('reef/s/a/ctd/c', big))).toBe(false);
  });
});
