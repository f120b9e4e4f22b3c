// Archive lines built from the received bytes (docs/contract-v1.md, section 2): the payload is spliced into
// `{"topic":...,"rx":...,"msg":<payload>}` as it arrived, not parsed and re-serialised. Reading the line
// back gives the payload's own JSON value (numbers, key order, escapes as the sensor sent them).
import { archiveLine, type MessageParse } from '../../libs/contract/index.js';

/** One received message for the archive. */
export interface ArchiveMessage {
  topic: string;
  /** Receive time, ms since the epoch: the `rx` field and the day file. */
  rxMs: number;
  payload: Uint8Array;
  /**
   * True when the payload is valid UTF-8 whose text JSON.parse accepts (the intake parsed it): it is then
   * spliced in as received. False for anything else, which is stored as its text (a JSON string).
   */
  json: boolean;
  /** Why the message was rejected, when it was: the line's `reject` field. */
  reject?: string | undefined;
}

const lenient = new TextDecoder('utf-8', { fatal: false });
const LF = 0x0a;
const CR = 0x0d;
const SPACE = 0x20;

/** The archive line of one message as UTF-8 bytes, without the newline. */
export function archiveLineBytes(m: ArchiveMessage): Buffer {
  const rxIso = new Date(m.rxMs).toISOString();
  if (!m.json) return Buffer.from(archiveLine(m.topic, rxIso, lenient.decode(m.payload), m.reject), 'utf8');
  const p = m.payload;
  // A UTF-8 byte order mark is not JSON; the decoder the intake parses with drops it, and so do we.
  const start = p[0] === 0xef && p[1] === 0xbb && p[2] === 0xbf ? 3 : 0;
  const head = `{"topic":${JSON.stringify(m.topic)},"rx":"${rxIso}","msg":`;
  const tail = m.reject === undefined ? '}' : `,"reject":${JSON.stringify(m.reject)}}`;
  const headBytes = Buffer.byteLength(head, 'utf8');
  const bodyBytes = p.length - start;
  const out = Buffer.allocUnsafe(headBytes + bodyBytes + Buffer.byteLength(tail, 'utf8'));
  out.write(head, 0, 'utf8');
  out.set(start === 0 ? p : p.subarray(start), headBytes);
  out.write(tail, headBytes + bodyBytes, 'utf8');
  // In a JSON text a line break can only be whitespace between tokens (a string cannot hold a raw one),
  // so a space keeps the value and the one-message-per-line layout. CR counts: the reader splits on it.
  for (const b of [LF, CR]) {
    for (let i = out.indexOf(b, headBytes); i >= 0 && i < headBytes + bodyBytes; i = out.indexOf(b, i + 1))
      out[i] = SPACE;
  }
  return out;
}

/**
 * Whether parseMessage (or parsePayload) read the payload as JSON text: accepted, or rejected after the
 * JSON parse. Rejected before it: the topic, a payload over the size limit, invalid UTF-8, JSON syntax.
 */
export function parsedAsJson(parse: MessageParse): boolean {
  if (parse.ok) return true;
  if (parse.parts === undefined) return false;
  return !BEFORE_JSON.has(parse.code);
}

const BEFORE_JSON: ReadonlySet<string> = new Set(['too_large', 'bad_utf8', 'json_syntax']);
