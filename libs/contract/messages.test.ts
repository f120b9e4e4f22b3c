// Contract v1 (docs/contract-v1.md, section 1): every example is accepted, every bad input rejected with
// the right reason and path, and the parser never throws whatever the bytes.
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { MAX_PAYLOAD_BYTES, parseMessage, parsePayload } from './index.js';

interface Good {
  topic: string;
  msg: Record<string, unknown>;
}
interface Bad {
  why: string;
  topic: string;
  payload: string;
  code: string;
  path?: string;
}
const fixtures = new URL('../../test/fixtures/messages/', import.meta.url);
const good = JSON.parse(readFileSync(new URL('good.json', fixtures), 'utf8')) as Good[];
const bad = JSON.parse(readFileSync(new URL('bad.json', fixtures), 'utf8')) as Bad[];

describe('contract examples are accepted', () => {
  it.each(good.map((g) => [g.topic, g] as const))('%s', (_t, g) => {
    const r = parseMessage(g.topic, JSON.stringify(g.msg));
    if (!r.ok) throw new Error(`rejected: ${r.reason}`);
    const [, site, station, kind, sensor] = g.topic.split('/');
    expect(r.message).toMatchObject({ site, station, kind, sensor });
    expect(r.message.tMs).toBe(Date.parse(g.msg.t as string));
  });

  it('keeps a null inside vel_m_s as a bad value', () => {
    const adcp = good.find((g) => g.msg.coord === 'beam')!;
    const r = parseMessage(adcp.topic, JSON.stringify(adcp.msg));
    expect(r.ok && r.message.kind === 'adcp' && r.message.vel_m_s[1]?.[2]).toBeNull();
  });

  it('reads an offset time as UTC', () => {
    const r = parseMessage(
      'reef/s/a/oxygen/o',
      JSON.stringify({ v: 1, t: '2026-03-01T16:00:00+10:00', o2_sat_pct: 99, temp_c: 27 }),
    );
    expect(r.ok && r.message.tMs).toBe(Date.UTC(2026, 2, 1, 6, 0, 0));
  });
});

describe('bad inputs are rejected with a reason and a path', () => {
  it.each(bad.map((b) => [b.why, b] as const))('%s', (_why, b) => {
    const r = parseMessage(b.topic, b.payload);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.code === b.code || r.reason === b.code).toBe(true);
    expect(r.path).toBe(b.path);
    expect(r.reason).toBe(b.path ? `${b.code}:${b.path}` : b.code);
  });

  it('rejects an oversize payload before parsing it (2 MB string field)', () => {
    const big = JSON.stringify({
      v: 1,
      t: '2026-03-01T06:00:00Z',
      temp_c: 27,
      sal: 35,
      note: 'x'.repeat(2 * 1024 * 1024),
    });
    const r = parseMessage('reef/s/a/ctd/c', big);
    expect(r.ok).toBe(false);
    expect(!r.ok && r.code).toBe('too_large');
  });

  it('rejects a burst over 16384 samples', () => {
    const p = new Array(16385).fill(10.1);
    const r = parseMessage(
      'reef/s/a/pressure/p',
      JSON.stringify({ v: 1, t: '2026-03-01T06:00:00Z', fs_hz: 4, p_dbar: p }),
    );
    expect(!r.ok && r.reason).toBe('bad_length:p_dbar');
  });

  it('rejects more than 256 ADCP bins', () => {
    const vel = new Array(257).fill([0, 0, 0, 0]);
    const r = parseMessage(
      'reef/s/a/adcp/x',
      JSON.stringify({
        v: 1,
        t: '2026-03-01T06:00:00Z',
        coord: 'earth',
        blank_m: 0.1,
        bin_m: 0.1,
        vel_m_s: vel,
      }),
    );
    expect(!r.ok && r.reason).toBe('bad_length:vel_m_s');
  });

  it('rejects invalid UTF-8', () => {
    const r = parsePayload(
      { site: 's', station: 'a', kind: 'ctd', sensor: 'c' },
      new Uint8Array([0x7b, 0xff, 0x7d]),
    );
    expect(!r.ok && r.code).toBe('bad_utf8');
  });

  it('leaves prototype keys harmless', () => {
    const payload =
      '{"v":1,"t":"2026-03-01T06:00:00Z","temp_c":27,"sal":35,"__proto__":{"polluted":1},"constructor":{"prototype":{"polluted":2}}}';
    const r = parseMessage('reef/s/a/ctd/c', payload);
    expect(r.ok).toBe(true);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    if (r.ok) {
      expect(Object.getPrototypeOf(r.message)).toBe(Object.prototype);
      expect((r.message as unknown as Record<string, unknown>).polluted).toBeUndefined();
    }
  });

  it('honours a configured multi-level prefix', () => {
    const payload = JSON.stringify({ v: 1, t: '2026-03-01T06:00:00Z', par_umol_m2_s: 10 });
    expect(parseMessage('net/east/s/a/par/p', payload, 'net/east').ok).toBe(true);
    expect(parseMessage('reef/s/a/par/p', payload, 'net/east').ok).toBe(false);
  });
});

describe('property: the parser never throws', () => {
  const kinds = ['ctd', 'oxygen', 'pco2', 'pressure', 'adcp', 'par', 'met', 'sample', 'x'];
  it('on arbitrary bytes', () => {
    fc.assert(
      fc.property(fc.constantFrom(...kinds), fc.uint8Array({ maxLength: 300 }), (kind, bytes) => {
        const r = parseMessage(`reef/s/a/${kind}/c`, bytes);
        expect(typeof r.ok).toBe('boolean');
      }),
      { numRuns: 2000 },
    );
  });
  it('on arbitrary JSON values', () => {
    fc.assert(
      fc.property(fc.constantFrom(...kinds), fc.jsonValue(), (kind, value) => {
        const r = parseMessage(`reef/s/a/${kind}/c`, JSON.stringify(value) ?? 'null');
        if (!r.ok) expect(r.reason.length).toBeGreaterThan(0);
      }),
      { numRuns: 2000 },
    );
  });
  it('on mutated valid messages', () => {
    const base = { v: 1, t: '2026-03-01T06:00:00Z', temp_c: 27, sal: 35 };
    fc.assert(
      fc.property(
        fc.dictionary(fc.constantFrom('v', 't', 'temp_c', 'sal', 'seq', 'battery_v', 'site'), fc.anything()),
        (over) => {
          const text = (() => {
            try {
              return JSON.stringify({ ...base, ...over });
            } catch {
              return '{}';
            }
          })();
          const r = parseMessage('reef/s/a/ctd/c', text);
          if (r.ok) {
            expect(Number.isFinite(r.message.tMs)).toBe(true);
            expect(r.message.kind).toBe('ctd');
          }
        },
      ),
      { numRuns: 1000 },
    );
  });
  it('stays under the size bound it promises', () => {
    expect(MAX_PAYLOAD_BYTES).toBeGreaterThan(16384 * 12);
  });
});
