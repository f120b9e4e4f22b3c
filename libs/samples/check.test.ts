import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText, type ReefdConfig } from '../contract/index.js';
import { checkSheet, type ArchiveFacts } from './check.js';
import { parseCsv } from './csv.js';

const demo = readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8').replace(
  '      ctd-back: { kind: ctd }',
  '      ctd-back: { kind: ctd }\n      bottle-back: { kind: sample }',
);
const parsed = parseConfigText(demo);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config: ReefdConfig = parsed.config;
const facts: ArchiveFacts = {
  firstMs: Date.parse('2026-07-14T00:00:00Z'),
  lastMs: Date.parse('2026-07-20T00:00:00Z'),
  samples: new Map([['back/bottle-back/' + Date.parse('2026-07-15T06:00:00Z'), '2026-07-15T06:00:01Z']]),
};
const check = (text: string) => {
  const p = parseCsv(text);
  if (!p.ok) throw new Error(p.reason);
  return checkSheet(config, p.header, p.rows, facts);
};
const H = 't,station,sensor,ta_umol_kg,dic_umol_kg,o2_umol_kg,sal,temp_c\n';

describe('checkSheet', () => {
  it('accepts good rows as sample messages on the sensor topic', () => {
    const r = check(
      `${H}2026-07-14T08:30:00Z,back,bottle-back,2291.4,1998.2,201.5,35.12,27.4\n2026-07-14T09:30:00+10:00,back,bottle-back,2290,,,,\n`,
    );
    expect(r.rejected).toEqual([]);
    expect(r.accepted).toEqual([
      {
        row: 2,
        topic: 'reef/ornen-reef/back/sample/bottle-back',
        msg: {
          v: 1,
          t: '2026-07-14T08:30:00Z',
          ta_umol_kg: 2291.4,
          dic_umol_kg: 1998.2,
          o2_umol_kg: 201.5,
          sal: 35.12,
          temp_c: 27.4,
        },
      },
      {
        row: 3,
        topic: 'reef/ornen-reef/back/sample/bottle-back',
        msg: { v: 1, t: '2026-07-14T09:30:00+10:00', ta_umol_kg: 2290 },
      },
    ]);
  });

  it('rejects each bad row with its row number and every reason', () => {
    const r = check(
      H +
        [
          '2026-07-14T08:30:00Z,back,bottle-back,2.291,1998,,,', // 2: mmol/kg
          '2026-07-14T08:30:00Z,lagoon9,bottle-back,2291,,,,', // 3: unknown station
          '2026-07-14T08:30:00Z,back,o2-back,2291,,,,', // 4: not a sample sensor
          '2026-07-14 08:30,back,bottle-back,2291,,,,', // 5: no zone
          '2026-07-14T10:00:00Z,back,bottle-back,,,6.4,,', // 6: O2 in mg/L
          '2026-07-14T11:00:00Z,back,bottle-back,"2291,5",,,,300.1', // 7: decimal comma, kelvin
          '2026-08-30T11:00:00Z,back,bottle-back,2291,,,,', // 8: after the deployment
          '2026-07-15T06:00:00Z,back,bottle-back,2291,,,,', // 9: already in the archive
          '2026-07-14T12:00:00Z,back,bottle-back,2291,,,,', // 10: fine
          '2026-07-14T12:00:00.000Z,back,bottle-back,2292,,,,', // 11: duplicate of 10 (same instant)
          '2026-07-14T13:00:00Z,back,bottle-back,,,,35,27', // 12: no value
          '2026-07-14T14:00:00Z,back,bottle-back,9100,,,,', // 13: out of range
        ].join('\n'),
    );
    const by = Object.fromEntries(r.rejected.map((x) => [x.row, x.reasons]));
    expect(by[2]).toEqual(['ta_umol_kg 2.291 looks like mmol/kg; give umol/kg (x 1000)']);
    expect(by[3]?.[0]).toBe('unknown station "lagoon9" (sample sensors: back/bottle-back)');
    expect(by[4]?.[0]).toBe(
      'back/o2-back is an oxygen sensor, not a sample sensor (sample sensors: back/bottle-back)',
    );
    expect(by[5]?.[0]).toBe(
      't "2026-07-14 08:30" has no time zone; write it as 2026-07-14T08:30Z for UTC, or with its offset (+10:00)',
    );
    expect(by[6]?.[0]).toMatch(/^o2_umol_kg 6.4 looks like mg\/L/);
    expect(by[7]).toEqual([
      'ta_umol_kg "2291,5" is not a number; use a point as the decimal mark',
      'temp_c 300.1 looks like kelvin; give degC (K - 273.15)',
    ]);
    expect(by[8]).toEqual([
      't 2026-08-30T11:00:00Z is outside the deployment in the archive (2026-07-14T00:00:00.000Z to 2026-07-20T00:00:00.000Z)',
    ]);
    expect(by[9]).toEqual(['is already in the archive (received 2026-07-15T06:00:01Z)']);
    expect(by[10]).toBeUndefined();
    expect(by[11]).toEqual(['repeats row 10 (same station, sensor and time)']);
    expect(by[12]).toEqual(['has none of ta_umol_kg, dic_umol_kg, ph_total, o2_umol_kg']);
    expect(by[13]?.[0]).toMatch(/ta_umol_kg 9100 is outside 1000-3500 umol\/kg/);
    expect(r.accepted.map((a) => a.row)).toEqual([10]);
  });

  it('refuses a sheet without the id columns or with unknown columns', () => {
    expect(check('t,station,ta_umol_kg\n2026-07-14T08:30:00Z,back,2291\n').sheet).toEqual([
      'the column "sensor" is missing',
    ]);
    expect(check('t,station,sensor,ta_mmol_kg\n').sheet).toEqual([
      'column 4 "ta_mmol_kg" is not one of t, station, sensor, ta_umol_kg, dic_umol_kg, ph_total, o2_umol_kg, sal, temp_c',
      'no value column (ta_umol_kg, dic_umol_kg, ph_total, o2_umol_kg, sal, temp_c)',
    ]);
  });
});
