// The first stage of the intake: a payload decoded and parsed once. The one JSON value serves validation
// and the redelivery key; the archive splices the payload's own bytes (services/archive/line.ts).
import { createHash } from 'node:crypto';
import {
  MAX_PAYLOAD_BYTES,
  parseTopic,
  validatePayload,
  type MessageParse,
  type ReefdConfig,
  type TopicParts,
} from '../../libs/contract/index.js';
import { checkAgainstConfig } from '../../libs/processor/index.js';
import { parsedAsJson } from '../archive/line.js';

export interface Decoded {
  topic: string;
  /** The payload as text (invalid UTF-8 replaced), for the dead-letter output. */
  text: string;
  /** The payload goes into the archive line as JSON (spliced), not as a string of its text. */
  json: boolean;
  /** The form the redelivery key is computed from (the same from a live payload and an archive line). */
  canonical: string;
  parse: MessageParse;
  /** Why the message is rejected (schema or configuration), or undefined when it is accepted. */
  reason: string | undefined;
  kind: string;
}

const strict = new TextDecoder('utf-8', { fatal: true });
const lenient = new TextDecoder('utf-8', { fatal: false });

function rejection(code: string, parts?: TopicParts): MessageParse {
  return parts === undefined ? { ok: false, code, reason: code } : { ok: false, code, reason: code, parts };
}

/** Decodes, parses and validates one payload (the same rules as libs/contract parseMessage). */
export function decode(topic: string, payload: Uint8Array, config: ReefdConfig): Decoded {
  let text: string;
  let utf8 = true;
  try {
    text = strict.decode(payload);
  } catch {
    text = lenient.decode(payload);
    utf8 = false;
  }
  let raw: unknown;
  let json = true;
  try {
    raw = JSON.parse(text) as unknown;
  } catch {
    json = false;
  }
  const tp = parseTopic(topic, config.topic_prefix);
  let parse: MessageParse;
  if (!tp.ok) parse = rejection(tp.reason);
  else if (payload.byteLength > MAX_PAYLOAD_BYTES) parse = rejection('too_large', tp.parts);
  else if (!utf8) parse = rejection('bad_utf8', tp.parts);
  else if (!json) parse = rejection('json_syntax', tp.parts);
  else parse = validatePayload(tp.parts, raw);
  const reason = parse.ok ? checkAgainstConfig(config, parse.message) : parse.reason;
  const kind = parse.ok ? parse.message.kind : (parse.parts?.kind ?? 'unknown');
  // As the archive will hold it: the payload's JSON value when it is spliced in, else its text.
  const spliced = json && utf8 && parsedAsJson(parse);
  const canonical =
    spliced && typeof raw !== 'string' ? JSON.stringify(raw) : spliced ? (raw as string) : text;
  return { topic, text, json: spliced, canonical, parse, reason, kind };
}

/**
 * The identity of a received message: its topic and a digest of its canonical payload. An archive line
 * read back (its `msg` stored parsed) gives the same key as the payload did.
 */
export function redeliveryKey(topic: string, canonical: string): string {
  return `${topic}\u0000${createHash('sha1').update(canonical).digest('base64')}`;
}

/** The key of an archive line's message (`msg` as the archive reader gives it). */
export function archivedKey(topic: string, msg: unknown): string {
  return redeliveryKey(topic, typeof msg === 'string' ? msg : JSON.stringify(msg));
}
