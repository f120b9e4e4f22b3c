// Sensor messages of contract v1 (docs/contract-v1.md, section 1): schemas, limits and the parser.
// The parser never throws: every failure becomes a short machine-readable reason plus the field path,
// which the daemon writes to the dead-letter output and the raw archive.
import { z } from 'zod';
import { compileValidators } from './fast-validate.js';
import { ID_PATTERN, isKind, parseTopic, type Kind, type TopicParts } from './ids.js';

/** Largest accepted payload. A 16384-sample burst at ~12 bytes a sample is ~200 kB. */
export const MAX_PAYLOAD_BYTES = 512 * 1024;
export const MAX_PRESSURE_SAMPLES = 16384;
export const MIN_PRESSURE_SAMPLES = 16;
export const MAX_ADCP_BINS = 256;

// Physically plausible ranges: anything outside cannot be a reading of the sea, so it is rejected here;
// the finer sensor and site limits are QC's job (libs/qc), which flags rather than rejects.
const num = (min: number, max: number) => z.number().min(min).max(max);
const tempC = num(-3, 45); // degC, ITS-90
const salinity = num(0, 50); // practical salinity
const presDbar = num(0, 1000); // dbar, absolute
const angleDeg = num(0, 360);

const isoTime = z
  .string()
  .max(40)
  .refine((s) => /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/.test(s), {
    message: 'bad_time',
  })
  .refine(
    (s) => {
      // Date.parse rolls 31 February over into March; a sample time with an impossible date is a fault.
      const y = Number(s.slice(0, 4));
      const mo = Number(s.slice(5, 7));
      const d = Number(s.slice(8, 10));
      if (mo < 1 || mo > 12 || d < 1 || d > new Date(Date.UTC(y, mo, 0)).getUTCDate()) return false;
      const ms = Date.parse(s);
      return Number.isFinite(ms) && ms >= Date.UTC(2000, 0, 1) && ms < Date.UTC(2100, 0, 1);
    },
    { message: 'bad_time' },
  );

const id = z.string().max(64).regex(ID_PATTERN);

const common = {
  v: z.literal(1),
  t: isoTime,
  seq: z.int().min(0).max(Number.MAX_SAFE_INTEGER).optional(),
  battery_v: num(0, 100).optional(),
  site: id.optional(),
  station: id.optional(),
  kind: z.string().max(32).optional(),
  sensor: id.optional(),
};

const fourOrNull = z.array(z.number().min(-20).max(20).nullable()).length(4);
const fourBounded = (min: number, max: number) => z.array(num(min, max)).length(4);

export const ctdSchema = z.object({
  ...common,
  temp_c: tempC,
  sal: salinity,
  pres_dbar: presDbar.optional(),
  cond_mS_cm: num(0, 100).optional(),
});

export const oxygenSchema = z.object({
  ...common,
  o2_umol_l: num(0, 1500).optional(),
  o2_mg_l: num(0, 50).optional(),
  o2_sat_pct: num(0, 600).optional(),
  temp_c: tempC,
  sal_setting: salinity.optional(),
});

export const pco2Schema = z.object({
  ...common,
  pco2_uatm: num(0, 100000),
  temp_c: tempC.optional(),
});

export const pressureSchema = z.object({
  ...common,
  fs_hz: z.number().gt(0).max(100),
  // A null marks a sample the logger flagged bad (an extension of v1; the waves lib interpolates up to 5 %).
  p_dbar: z.array(presDbar.nullable()).min(MIN_PRESSURE_SAMPLES).max(MAX_PRESSURE_SAMPLES),
  temp_c: tempC.optional(),
});

export const adcpSchema = z.object({
  ...common,
  coord: z.enum(['beam', 'inst', 'earth']),
  blank_m: num(0, 100),
  bin_m: z.number().gt(0).max(100),
  vel_m_s: z.array(fourOrNull).min(1).max(MAX_ADCP_BINS),
  heading_deg: angleDeg.optional(),
  pitch_deg: num(-90, 90).optional(),
  roll_deg: num(-180, 180).optional(),
  corr_pct: z.array(fourBounded(0, 100)).max(MAX_ADCP_BINS).optional(),
  echo: z.array(fourBounded(0, 1000)).max(MAX_ADCP_BINS).optional(),
  pres_dbar: presDbar.optional(),
  temp_c: tempC.optional(),
});

export const parSchema = z.object({
  ...common,
  par_umol_m2_s: num(-50, 5000),
});

export const metSchema = z.object({
  ...common,
  wind_m_s: num(0, 100),
  baro_hpa: num(800, 1100),
  wind_dir_deg: angleDeg.optional(),
  air_temp_c: num(-40, 60).optional(),
  xco2_air_ppm: num(0, 5000).optional(),
});

export const sampleSchema = z.object({
  ...common,
  ta_umol_kg: num(0, 5000).optional(),
  dic_umol_kg: num(0, 5000).optional(),
  ph_total: num(5, 10).optional(),
  /** Reference dissolved oxygen of the bottle (Winkler or another lab method), umol/kg. */
  o2_umol_kg: num(0, 1000).optional(),
  sal: salinity.optional(),
  temp_c: tempC.optional(),
});

export const MESSAGE_SCHEMAS = {
  ctd: ctdSchema,
  oxygen: oxygenSchema,
  pco2: pco2Schema,
  pressure: pressureSchema,
  adcp: adcpSchema,
  par: parSchema,
  met: metSchema,
  sample: sampleSchema,
} as const satisfies Record<Kind, z.ZodType>;

/** The same decisions as MESSAGE_SCHEMAS, made without zod for accepted messages (fast-validate.ts). */
const FAST_VALIDATORS = compileValidators<Kind>(MESSAGE_SCHEMAS);

/** The kinds whose accepts take the fast path (every kind, unless a schema uses what it cannot mirror). */
export function fastValidatedKinds(): Kind[] {
  return Object.keys(FAST_VALIDATORS) as Kind[];
}

interface Envelope {
  site: string;
  station: string;
  sensor: string;
  /** The sample time (`t`) in ms since the epoch. */
  tMs: number;
}

export type CtdMessage = Envelope & { kind: 'ctd' } & z.infer<typeof ctdSchema>;
export type OxygenMessage = Envelope & { kind: 'oxygen' } & z.infer<typeof oxygenSchema>;
export type Pco2Message = Envelope & { kind: 'pco2' } & z.infer<typeof pco2Schema>;
export type PressureMessage = Envelope & { kind: 'pressure' } & z.infer<typeof pressureSchema>;
export type AdcpMessage = Envelope & { kind: 'adcp' } & z.infer<typeof adcpSchema>;
export type ParMessage = Envelope & { kind: 'par' } & z.infer<typeof parSchema>;
export type MetMessage = Envelope & { kind: 'met' } & z.infer<typeof metSchema>;
export type SampleMessage = Envelope & { kind: 'sample' } & z.infer<typeof sampleSchema>;

export type SensorMessage =
  | CtdMessage
  | OxygenMessage
  | Pco2Message
  | PressureMessage
  | AdcpMessage
  | ParMessage
  | MetMessage
  | SampleMessage;

export interface Rejection {
  ok: false;
  /** Short machine-readable reason, e.g. `out_of_range`, `missing_field`, `json_syntax`. */
  code: string;
  /** Dotted field path inside the payload, when the problem is in one field. */
  path?: string;
  /** `code` or `code:path`: the form written to the archive's `reject` field and the dead-letter output. */
  reason: string;
  /** Topic parts when the topic itself was valid (dead letters are grouped by sensor). */
  parts?: TopicParts;
}

export type MessageParse = { ok: true; message: SensorMessage } | Rejection;

function reject(code: string, path?: string, parts?: TopicParts): Rejection {
  const r: Rejection = { ok: false, code, reason: path ? `${code}:${path}` : code };
  if (path !== undefined) r.path = path;
  if (parts !== undefined) r.parts = parts;
  return r;
}

/** Maps the first zod issue to our reason code and dotted path. */
export function issueToReason(issue: z.core.$ZodIssue, input: unknown): { code: string; path: string } {
  const path = issue.path.map(String).join('.');
  switch (issue.code) {
    case 'invalid_type': {
      let value: unknown = input;
      for (const key of issue.path) {
        value =
          value !== null && typeof value === 'object'
            ? (value as Record<PropertyKey, unknown>)[key]
            : undefined;
      }
      return { code: value === undefined ? 'missing_field' : 'wrong_type', path };
    }
    case 'too_small':
    case 'too_big':
      return {
        code: issue.origin === 'array' || issue.origin === 'string' ? 'bad_length' : 'out_of_range',
        path,
      };
    case 'invalid_value':
      return { code: path === 'v' ? 'bad_version' : 'bad_value', path };
    case 'invalid_format':
      return { code: 'bad_format', path };
    case 'unrecognized_keys':
      return { code: 'unknown_field', path: issue.keys[0] ?? path };
    case 'custom':
      return { code: issue.message || 'invalid', path };
    default:
      return { code: 'invalid', path };
  }
}

function crossCheck(kind: Kind, m: Record<string, unknown>): { code: string; path?: string } | undefined {
  if (
    kind === 'oxygen' &&
    m.o2_umol_l === undefined &&
    m.o2_mg_l === undefined &&
    m.o2_sat_pct === undefined
  ) {
    return { code: 'missing_field', path: 'o2_umol_l' };
  }
  if (
    kind === 'sample' &&
    m.ta_umol_kg === undefined &&
    m.dic_umol_kg === undefined &&
    m.ph_total === undefined &&
    m.o2_umol_kg === undefined
  ) {
    return { code: 'missing_field', path: 'ta_umol_kg' };
  }
  if (kind === 'adcp') {
    const a = m as z.infer<typeof adcpSchema>;
    if (a.coord !== 'earth') {
      for (const key of ['heading_deg', 'pitch_deg', 'roll_deg'] as const) {
        if (a[key] === undefined) return { code: 'missing_field', path: key };
      }
    }
    const bins = a.vel_m_s.length;
    if (a.corr_pct !== undefined && a.corr_pct.length !== bins)
      return { code: 'bad_length', path: 'corr_pct' };
    if (a.echo !== undefined && a.echo.length !== bins) return { code: 'bad_length', path: 'echo' };
  }
  return undefined;
}

const decoder = new TextDecoder('utf-8', { fatal: true });

/**
 * Parses one MQTT message. `payload` is the raw bytes (or an already-decoded string).
 * Never throws; prototype keys (`__proto__`, `constructor`) are inert because JSON.parse makes them own
 * properties and zod copies only the declared keys.
 */
export function parseMessage(topic: string, payload: Uint8Array | string, prefix = 'reef'): MessageParse {
  const tp = parseTopic(topic, prefix);
  if (!tp.ok) return reject(tp.reason);
  return parsePayload(tp.parts, payload);
}

/** Parses a payload whose topic (or Kafka key and fields) has already given the sensor's identity. */
export function parsePayload(parts: TopicParts, payload: Uint8Array | string): MessageParse {
  const size = typeof payload === 'string' ? payload.length : payload.byteLength;
  if (size > MAX_PAYLOAD_BYTES) return reject('too_large', undefined, parts);
  let text: string;
  try {
    text = typeof payload === 'string' ? payload : decoder.decode(payload);
  } catch {
    return reject('bad_utf8', undefined, parts);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    return reject('json_syntax', undefined, parts);
  }
  return validatePayload(parts, raw);
}

/** Validates an already-parsed JSON value against the kind named by `parts.kind`. */
export function validatePayload(parts: TopicParts, raw: unknown): MessageParse {
  return validateWith(parts, raw, true);
}

/** validatePayload through zod alone (the reference the fast path is tested and benchmarked against). */
export function validatePayloadZod(parts: TopicParts, raw: unknown): MessageParse {
  return validateWith(parts, raw, false);
}

function validateWith(parts: TopicParts, raw: unknown, fast: boolean): MessageParse {
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw))
    return reject('not_object', undefined, parts);
  if (!isKind(parts.kind)) return reject('unknown_kind', 'kind', parts);
  const kind = parts.kind;
  // The fast path answers for what zod accepts; anything else goes to zod, which gives the reason.
  let m = fast ? FAST_VALIDATORS[kind]?.(raw as Record<string, unknown>) : undefined;
  if (m === undefined) {
    const result = MESSAGE_SCHEMAS[kind].safeParse(raw);
    if (!result.success) {
      const first = result.error.issues[0];
      if (first === undefined) return reject('invalid', undefined, parts);
      const { code, path } = issueToReason(first, raw);
      return reject(code, path || undefined, parts);
    }
    m = result.data as Record<string, unknown>;
  }
  for (const key of ENVELOPE_KEYS) {
    if (m[key] !== undefined && m[key] !== parts[key]) return reject('topic_mismatch', key, parts);
  }
  const cross = crossCheck(kind, m);
  if (cross) return reject(cross.code, cross.path, parts);
  // `m` is a fresh object (zod's output or the fast path's): completed in place rather than copied, with
  // the same keys in the same order as a spread would give.
  m.site = parts.site;
  m.station = parts.station;
  m.kind = kind;
  m.sensor = parts.sensor;
  m.tMs = Date.parse(m.t as string);
  return { ok: true, message: m as unknown as SensorMessage };
}

const ENVELOPE_KEYS = ['site', 'station', 'kind', 'sensor'] as const;
