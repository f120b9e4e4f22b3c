import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseConfigText, type ReefdConfig } from '../contract/index.js';
import { LOGBOOK_ERRORS } from './errors.js';
import {
  buildExclusionIndex,
  exclusionAt,
  exclusionsDuring,
  formatLogbookEntry,
  parseLogbookText,
  type LogbookEntry,
} from './logbook.js';

const demo = parseConfigText(
  readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
);
if (!demo.ok) throw new Error('demo config invalid');
const config: ReefdConfig = demo.config;
const ms = (s: string) => Date.parse(s);

const TEXT = `# Ornen Reef field log
- t: 2026-07-15T09:40:00Z
  station: back
  sensor: adcp-back
  event: relevel
  text: diver bumped the frame; re-levelled
  exclude_from: 2026-07-15T09:20:00Z
  exclude_to: 2026-07-15T10:10:00Z
- t: 2026-07-16T08:00:00Z
  station: flat
  event: cleaning
  text: all sensors wiped
  exclude_from: 2026-07-16T07:45:00Z
  exclude_to: 2026-07-16T08:15:00Z
- t: 2026-07-16T12:00:00Z
  station: crest
  event: note
  text: turtle on the frame
`;

describe('logbook file', () => {
  it('reads entries with optional sensor and exclusion', () => {
    const r = parseLogbookText(TEXT, config);
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    expect(r.entries).toHaveLength(3);
    expect(r.entries[0]).toMatchObject({ station: 'back', sensor: 'adcp-back', event: 'relevel' });
    expect(r.entries[2]?.exclude_from).toBeUndefined();
  });

  it('names each problem with its entry, key and line', () => {
    const bad = `- t: 2026-07-15T09:40:00Z
  station: back
  event: hammering
  text: x
- t: 2026-07-15 09:40
  station: lagoon2
  event: note
  text: x
- t: 2026-07-15T09:40:00Z
  station: back
  sensor: ctd-back
  event: swap
  text: x
  exclude_from: 2026-07-15T10:00:00Z
`;
    const r = parseLogbookText(bad, config);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(LOGBOOK_ERRORS.codes).toContain(r.code);
    const by = Object.fromEntries(r.problems.map((p) => [p.path, p]));
    expect(by['0.event']?.message).toMatch(/must be one of cleaning, swap, relevel, deploy, recover, note/);
    expect(by['0.event']?.line).toBe(3);
    expect(by['1.t']?.message).toMatch(/ISO 8601 time with a zone/);
    expect(by['2.exclude_to']?.message).toBe('an exclusion needs both exclude_from and exclude_to');
    const unknown = parseLogbookText(TEXT.replace('station: flat', 'station: flats'), config);
    expect(!unknown.ok && unknown.problems[0]).toMatchObject({
      path: '1.station',
      message: 'station "flats" is not in the configuration',
      line: 10,
    });
  });
});

describe('exclusionAt', () => {
  const r = parseLogbookText(TEXT, config);
  if (!r.ok) throw new Error('fixture');
  const idx = buildExclusionIndex(r.entries);

  it('excludes the sensor named, inside [from, to) only', () => {
    expect(exclusionAt(idx, 'back', 'adcp-back', ms('2026-07-15T09:20:00Z'))?.event).toBe('relevel');
    expect(exclusionAt(idx, 'back', 'adcp-back', ms('2026-07-15T10:09:59Z'))?.event).toBe('relevel');
    expect(exclusionAt(idx, 'back', 'adcp-back', ms('2026-07-15T10:10:00Z'))).toBeUndefined();
    expect(exclusionAt(idx, 'back', 'adcp-back', ms('2026-07-15T09:19:59Z'))).toBeUndefined();
    expect(exclusionAt(idx, 'back', 'ctd-back', ms('2026-07-15T09:30:00Z'))).toBeUndefined();
  });

  it('excludes every sensor of a station for a station-wide entry; notes exclude nothing', () => {
    for (const s of ['ctd-flat', 'o2-flat', 'p-flat'])
      expect(exclusionAt(idx, 'flat', s, ms('2026-07-16T08:00:00Z'))?.event).toBe('cleaning');
    expect(exclusionAt(idx, 'crest', 'ctd-crest', ms('2026-07-16T12:00:00Z'))).toBeUndefined();
  });

  it('property: agrees with a linear scan over overlapping random exclusions', () => {
    const iv = fc.record({
      from: fc.integer({ min: 0, max: 1000 }),
      len: fc.integer({ min: 1, max: 300 }),
      wide: fc.boolean(),
    });
    fc.assert(
      fc.property(
        fc.array(iv, { maxLength: 12 }),
        fc.array(fc.integer({ min: -10, max: 1400 }), { maxLength: 30 }),
        (ivs, ts) => {
          const base = ms('2026-07-01T00:00:00Z');
          const entries: LogbookEntry[] = ivs.map((v) => ({
            t: new Date(base).toISOString(),
            station: 'back',
            ...(v.wide ? {} : { sensor: 'ctd-back' }),
            event: 'note',
            text: '',
            exclude_from: new Date(base + v.from * 60_000).toISOString(),
            exclude_to: new Date(base + (v.from + v.len) * 60_000).toISOString(),
          }));
          const index = buildExclusionIndex(entries);
          for (const m of ts) {
            const t = base + m * 60_000;
            const want = ivs.some((v) => t >= base + v.from * 60_000 && t < base + (v.from + v.len) * 60_000);
            expect(exclusionAt(index, 'back', 'ctd-back', t) !== undefined).toBe(want);
            const wantOther = ivs.some(
              (v) => v.wide && t >= base + v.from * 60_000 && t < base + (v.from + v.len) * 60_000,
            );
            expect(exclusionAt(index, 'back', 'o2-back', t) !== undefined).toBe(wantOther);
          }
        },
      ),
    );
  });

  it('property: exclusionsDuring finds the exclusions overlapping a window, as a linear scan', () => {
    const iv = fc.record({
      from: fc.integer({ min: 0, max: 1000 }),
      len: fc.integer({ min: 1, max: 300 }),
      wide: fc.boolean(),
    });
    fc.assert(
      fc.property(
        fc.array(iv, { maxLength: 12 }),
        fc.integer({ min: -100, max: 1400 }),
        fc.integer({ min: 1, max: 120 }),
        (ivs, start, len) => {
          const base = ms('2026-07-01T00:00:00Z');
          const entries: LogbookEntry[] = ivs.map((v, i) => ({
            t: new Date(base).toISOString(),
            station: 'back',
            ...(v.wide ? {} : { sensor: 'ctd-back' }),
            event: 'note',
            text: String(i),
            exclude_from: new Date(base + v.from * 60_000).toISOString(),
            exclude_to: new Date(base + (v.from + v.len) * 60_000).toISOString(),
          }));
          const index = buildExclusionIndex(entries);
          const a = base + start * 60_000;
          const b = a + len * 60_000;
          const hit = (v: { from: number; len: number }) =>
            base + v.from * 60_000 < b && base + (v.from + v.len) * 60_000 > a;
          const got = (sensor: string) =>
            exclusionsDuring(index, 'back', sensor, a, b)
              .map((e) => Number(e.text))
              .sort((x, y) => x - y);
          const want = (wideOnly: boolean) =>
            ivs.flatMap((v, i) => (hit(v) && (v.wide || !wideOnly) ? [i] : []));
          expect(got('ctd-back')).toEqual(want(false));
          expect(got('o2-back')).toEqual(want(true));
        },
      ),
    );
  });

  it('formats an entry that reads back equal (text with quotes and colons)', () => {
    const e: LogbookEntry = {
      t: '2026-07-15T09:40:00Z',
      station: 'back',
      sensor: 'co2-back',
      event: 'swap',
      text: 'swapped: "SN 1042" -> SN 1107',
      exclude_from: '2026-07-15T09:00:00Z',
      exclude_to: '2026-07-15T11:00:00Z',
    };
    const r = parseLogbookText(formatLogbookEntry(e), config);
    expect(r.ok && r.entries).toEqual([e]);
  });
});
