// The record-type table: every record type has an entry, tags and identity follow the contract, and each field
// the table names is a field its schema knows (or one of the project's extension fields).
import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from './index.js';
import {
  alertRecordSchema,
  carbonateRecordSchema,
  currentRecordSchema,
  dailyRecordSchema,
  fluxRecordSchema,
  forecastRecordSchema,
  lightRecordSchema,
  oxygenRecordSchema,
  RECORD_TYPE_SPECS,
  RECORD_TYPES,
  recordKey,
  recordTags,
  wavesRecordSchema,
} from './index.js';

const SCHEMAS = {
  waves: wavesRecordSchema,
  current: currentRecordSchema,
  carbonate: carbonateRecordSchema,
  oxygen: oxygenRecordSchema,
  flux: fluxRecordSchema,
  alert: alertRecordSchema,
  light: lightRecordSchema,
  daily: dailyRecordSchema,
  forecast: forecastRecordSchema,
};
/** Extension fields the table lists beyond the zod shapes (loose objects allow them). */
const EXTENSIONS = new Set([
  'flag',
  'hm0_sigma_m',
  'speed_sigma_m_s',
  'ncp_sigma_mmol_m2_h',
  'nec_sigma_mmol_m2_h',
  'nec_inverse_mmol_m2_h',
  'sensor',
]);

describe('record-type table', () => {
  it('has one entry per schema in the union, nine in all', () => {
    expect(RECORD_TYPES.sort()).toEqual(Object.keys(SCHEMAS).sort());
    expect(RECORD_TYPES).toHaveLength(9);
  });

  it('lists only fields the schema has (or known extension fields), and every numeric contract field', () => {
    for (const type of RECORD_TYPES) {
      const shape = SCHEMAS[type].shape as Record<string, unknown>;
      const fields = Object.keys(RECORD_TYPE_SPECS[type].fields);
      for (const f of fields) expect(f in shape || EXTENSIONS.has(f), `${type}.${f}`).toBe(true);
      for (const f of Object.keys(shape)) {
        if (['type', 'site', 't', 'station', 'transect', 'calibrated', 'revision'].includes(f)) continue;
        expect(fields, `${type}.${f} missing from the table`).toContain(f);
      }
    }
  });

  it('tags station records by station and sensor, transect records by transect, alerts also by rule', () => {
    const o2 = {
      type: 'oxygen',
      site: 's',
      t: '2026-07-14T00:00:00Z',
      station: 'back',
      sensor: 'o2-b',
      o2_umol_kg: 1,
      o2_sat_pct: 1,
      o2_mg_l: 1,
    } as DerivedRecord;
    expect(recordTags(o2)).toEqual({ site: 's', station: 'back', sensor: 'o2-b' });
    const a = {
      type: 'alert',
      site: 's',
      t: 'x',
      station: 'back',
      sensor: 'co2',
      rule: 'stale',
      class: 'fault',
      state: 'raised',
      value: 1,
      limit: 1,
    } as DerivedRecord;
    expect(recordTags(a)).toEqual({ site: 's', station: 'back', sensor: 'co2', rule: 'stale' });
    const siteAlert = {
      type: 'alert',
      site: 's',
      t: 'x',
      rule: 'site_silent',
      class: 'fault',
      state: 'raised',
      value: 1,
      limit: 1,
    } as DerivedRecord;
    expect(recordTags(siteAlert)).toEqual({ site: 's', rule: 'site_silent' });
    const f = { type: 'flux', site: 's', t: 'x', transect: 'outer' } as unknown as DerivedRecord;
    expect(recordTags(f)).toEqual({ site: 's', transect: 'outer' });
  });

  it('gives two sensors at one station different keys, a revision the same key', () => {
    const base = {
      type: 'oxygen',
      site: 's',
      t: '2026-07-14T00:00:00Z',
      station: 'back',
      o2_umol_kg: 1,
      o2_sat_pct: 1,
      o2_mg_l: 1,
    };
    const a = recordKey({ ...base, sensor: 'o2-a' } as DerivedRecord);
    const b = recordKey({ ...base, sensor: 'o2-b' } as DerivedRecord);
    expect(a).not.toBe(b);
    expect(recordKey({ ...base, sensor: 'o2-a', revision: 2, o2_umol_kg: 5 } as DerivedRecord)).toBe(a);
    const raised = {
      type: 'alert',
      site: 's',
      t: 'x',
      rule: 'stale',
      station: 'b',
      sensor: 'c',
      class: 'fault',
      value: 1,
      limit: 1,
    };
    expect(recordKey({ ...raised, state: 'raised' } as DerivedRecord)).not.toBe(
      recordKey({ ...raised, state: 'cleared' } as DerivedRecord),
    );
  });
});
