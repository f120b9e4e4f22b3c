// Fuzzing the message parser (libs/contract parseMessage) and the archive line built from what it read.
import fc from 'fast-check';
import { describe, it } from 'vitest';
import { KINDS } from '../../../libs/contract/index.js';
import { fuzz, fuzzTimeoutMs } from './harness.js';
import { messageProperty, type MessageInput } from './properties.js';

const idChar = fc.constantFrom(...'abcXYZ019_.-'.split(''));
const id = fc.string({ unit: idChar, minLength: 1, maxLength: 8 }).map((s) => `a${s}`);
const hostile = fc.oneof(
  fc.string(),
  fc.string({ unit: 'binary' }),
  fc.constantFrom('', '/', '#', '+', '..', '\u0000', 'a/b', 'é', '\ud800', 'x'.repeat(300)),
);
const topic = fc.oneof(
  fc.tuple(id, id, fc.constantFrom(...KINDS), id).map(([si, st, k, se]) => `reef/${si}/${st}/${k}/${se}`),
  fc.tuple(hostile, hostile, hostile).map((p) => `reef/${p.join('/')}`),
  fc.array(hostile, { maxLength: 8 }).map((p) => p.join('/')),
);
const num = fc.oneof(
  fc.double(),
  fc.integer(),
  fc.constantFrom(0, -0, 1e308, -1e308, 5e-324, 35, 27.5, 1e21),
);
const value: fc.Arbitrary<unknown> = fc.oneof(
  num,
  fc.string(),
  fc.boolean(),
  fc.constant(null),
  fc.array(num, { maxLength: 40 }),
  fc.array(fc.array(fc.oneof(num, fc.constant(null)), { maxLength: 5 }), { maxLength: 8 }),
  fc.jsonValue({ maxDepth: 3 }),
);
const fieldNames = [
  'v',
  't',
  'seq',
  'battery_v',
  'temp_c',
  'sal',
  'pres_dbar',
  'cond_mS_cm',
  'o2_umol_l',
  'o2_mg_l',
  'o2_sat_pct',
  'sal_setting',
  'pco2_uatm',
  'fs_hz',
  'p_dbar',
  'coord',
  'blank_m',
  'bin_m',
  'vel_m_s',
  'heading_deg',
  'pitch_deg',
  'roll_deg',
  'corr_pct',
  'echo',
  'par_umol_m2_s',
  'wind_m_s',
  'baro_hpa',
  'wind_dir_deg',
  'ta_umol_kg',
  'dic_umol_kg',
  'ph_total',
  'site',
  'station',
  'kind',
  'sensor',
  '__proto__',
  'constructor',
];
const time = fc.oneof(
  fc.date({ noInvalidDate: true }).map((d) => d.toISOString()),
  fc.constantFrom('2026-12-01T00:00:00Z', '2026-12-01T00:00:00.000+13:00', '2026-02-30T00:00:00Z', 'now', ''),
  fc.string(),
);
const payloadObject = fc
  .tuple(
    fc.dictionary(fc.constantFrom(...fieldNames), value, { maxKeys: 12 }),
    fc.oneof(fc.constant(1), value),
    time,
  )
  .map(([o, v, t]) => JSON.stringify({ ...o, v, t }));

const input: fc.Arbitrary<MessageInput> = fc.oneof(
  fc.record({ topic, payload: payloadObject }),
  fc.record({ topic, payload: fc.string() }),
  fc.record({ topic, payload: fc.json() }),
  fc.record({
    topic,
    payload: fc.uint8Array({ maxLength: 300 }).map((b) => Buffer.from(b).toString('hex')),
    hex: fc.constant(true),
  }),
  fc.record({ topic, payload: payloadObject.map((s) => s.slice(0, Math.floor(s.length / 2))) }),
);

describe('fuzz: parseMessage', () => {
  it(
    'never throws, rejects with a short reason, accepts only finite matching messages',
    () => {
      fuzz('message', input, messageProperty);
    },
    fuzzTimeoutMs(),
  );
});
