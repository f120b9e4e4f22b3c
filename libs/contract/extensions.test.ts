// The December 2026 extensions of the contract (docs/contract-v1.md): configuration keys, the sample's
// reference oxygen, and the new record types, checked against the schemas.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CARBONATE_OPTION_NAMES } from '../carbonate/index.js';
import {
  BORON_RATIOS,
  CARBONIC_CONSTANT_SETS,
  derivedRecordSchema,
  formatProblem,
  parseConfigText,
  parseMessage,
} from './index.js';

const demo = readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8');
/** The demo without its time zone line, plus extra top-level lines. */
const noTz = demo.replace(/^timezone:.*\n/m, '');
const withLines = (extra: string) => `${noTz.trimEnd()}\n${extra}\n`;

describe('configuration extensions', () => {
  it('timezone defaults to UTC and takes IANA names (the demo lives at UTC-10)', () => {
    const r = parseConfigText(noTz);
    if (!r.ok) throw new Error(r.problems.map((p) => formatProblem(p)).join('\n'));
    expect(r.config.timezone).toBe('UTC');
    const d = parseConfigText(demo);
    expect(d.ok && d.config.timezone).toBe('Pacific/Tahiti');
  });

  it('refuses a time zone the runtime does not know, naming the key', () => {
    const r = parseConfigText(withLines('timezone: Atlantis/Lost_City'));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const p = r.problems.find((x) => x.path === 'timezone');
      expect(p?.message).toMatch(/IANA time zone/);
    }
  });

  it('carbonic_constants is an enum with the library default; the old key k1k2 is refused with the new name', () => {
    const ok = parseConfigText(
      withLines('carbonate: { carbonic_constants: dickson-millero1987, boron: uppstrom1974 }'),
    );
    expect(ok.ok && ok.config.carbonate).toEqual({
      carbonic_constants: 'dickson-millero1987',
      boron: 'uppstrom1974',
    });
    const typo = parseConfigText(withLines('carbonate: { carbonic_constants: lueker2001 }'));
    expect(typo.ok).toBe(false);
    if (!typo.ok) expect(typo.problems[0]?.path).toBe('carbonate.carbonic_constants');
    const old = parseConfigText(withLines('carbonate: { k1k2: lueker2000 }'));
    expect(old.ok).toBe(false);
    if (!old.ok) {
      expect(old.problems[0]?.path).toBe('carbonate.k1k2');
      expect(old.problems[0]?.message).toMatch(/renamed carbonate\.carbonic_constants/);
    }
    // One vocabulary: the configuration offers exactly the carbonate library's options, default first.
    expect([...CARBONIC_CONSTANT_SETS]).toEqual([...CARBONATE_OPTION_NAMES.carbonicConstants]);
    expect([...BORON_RATIOS]).toEqual([...CARBONATE_OPTION_NAMES.boron]);
  });

  it('calibration_file, logbook_file and alerts.silence_min are accepted; silence_min defaults to 15', () => {
    const r = parseConfigText(
      withLines('calibration_file: cal.yaml\nlogbook_file: logbook.yaml\nalerts: { silence_min: 20 }'),
    );
    if (!r.ok) throw new Error(r.problems.map((p) => formatProblem(p)).join('\n'));
    expect(r.config.calibration_file).toBe('cal.yaml');
    expect(r.config.logbook_file).toBe('logbook.yaml');
    expect(r.config.alerts?.silence_min).toBe(20);
    const d = parseConfigText(withLines('alerts: {}'));
    expect(d.ok && d.config.alerts?.silence_min).toBe(15);
    const bad = parseConfigText(withLines('alerts: { silence_min: 0 }'));
    expect(bad.ok).toBe(false);
  });
});

describe('sample messages with reference oxygen', () => {
  const enc = (o: unknown) => new TextEncoder().encode(JSON.stringify(o));
  it('accepts a bottle with only o2_umol_kg, rejects one with nothing to measure', () => {
    const ok = parseMessage(
      'reef/r/back/sample/bottle',
      enc({ v: 1, t: '2026-07-14T06:00:00Z', o2_umol_kg: 201.5 }),
      'reef',
    );
    expect(ok.ok).toBe(true);
    if (ok.ok && ok.message.kind === 'sample') expect(ok.message.o2_umol_kg).toBe(201.5);
    const none = parseMessage(
      'reef/r/back/sample/bottle',
      enc({ v: 1, t: '2026-07-14T06:00:00Z', sal: 35 }),
      'reef',
    );
    expect(none.ok).toBe(false);
    const bad = parseMessage(
      'reef/r/back/sample/bottle',
      enc({ v: 1, t: '2026-07-14T06:00:00Z', o2_umol_kg: -3 }),
      'reef',
    );
    expect(bad.ok).toBe(false);
  });
});

describe('new record types', () => {
  it('light, daily and forecast records parse; a daily day must be a local date', () => {
    const light = {
      type: 'light',
      site: 's',
      t: '2026-07-14T06:00:00Z',
      station: 'back',
      sensor: 'par',
      par_umol_m2_s: 812,
    };
    expect(derivedRecordSchema.safeParse(light).success).toBe(true);
    const nulls = Object.fromEntries(
      ['ncp', 'r', 'gpp', 'nec', 'nec_day', 'nec_night'].flatMap((f) => [
        [`${f}_mmol_m2_d`, 1],
        [`${f}_mmol_m2_d_sigma`, null],
      ]),
    );
    const daily = {
      type: 'daily',
      site: 's',
      t: '2026-07-13T10:00:00Z',
      transect: 'outer',
      day: '2026-07-13',
      ...nulls,
      coverage: 0.8,
      gap_filled: 0.1,
      pmax_mmol_m2_h: 40,
      ik_umol_m2_s: 400,
      valid: true,
    };
    expect(derivedRecordSchema.safeParse(daily).success).toBe(true);
    expect(derivedRecordSchema.safeParse({ ...daily, day: '13/07/2026' }).success).toBe(false);
    const forecast = {
      type: 'forecast',
      site: 's',
      t: '2026-07-14T05:00:00Z',
      station: 'lagoon',
      o2_min_mg_l: 2.4,
      o2_min_lo_mg_l: 1.9,
      o2_min_hi_mg_l: 2.9,
      t_min: '2026-07-14T15:40:00Z',
      horizon_h: 10.7,
    };
    expect(derivedRecordSchema.safeParse(forecast).success).toBe(true);
    expect(derivedRecordSchema.safeParse({ ...forecast, horizon_h: undefined }).success).toBe(false);
  });

  it('a flux record needs ncp_significant and nec_significant; alerts may name the fault silent', () => {
    const flux = {
      type: 'flux',
      site: 's',
      t: '2026-07-14T05:15:00Z',
      transect: 'outer',
      ncp_mmol_m2_h: 5,
      nec_mmol_m2_h: 1,
      nec_method: 'inverse',
      u_m_s: 0.1,
      depth_m: 1.2,
      residence_min: 40,
      valid: true,
    };
    expect(derivedRecordSchema.safeParse(flux).success).toBe(false);
    expect(
      derivedRecordSchema.safeParse({ ...flux, ncp_significant: true, nec_significant: false }).success,
    ).toBe(true);
    const silent = {
      type: 'alert',
      site: 's',
      t: '2026-07-14T05:15:00Z',
      rule: 'site_silent',
      class: 'fault',
      state: 'raised',
      value: 16,
      limit: 15,
      fault: 'silent',
    };
    expect(derivedRecordSchema.safeParse(silent).success).toBe(true);
    expect(derivedRecordSchema.safeParse({ ...silent, fault: 'asleep' }).success).toBe(false);
  });
});
