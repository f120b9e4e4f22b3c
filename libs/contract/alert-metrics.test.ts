// The alert metric table against the record-type table, and the configuration refusing a rule on a value
// reefd never computes or a limit in the wrong unit.
import { describe, expect, it } from 'vitest';
import { alertsConfigSchema } from './alert-config-schema.js';
import { implausibleLimit, METRICS, unknownMetric } from './alert-metrics.js';
import { RECORD_TYPE_SPECS } from './record-types.js';

const messages = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  (r.error?.issues ?? []).map((i) => `${i.path.join('.')}: ${i.message}`);

describe('alert metric table', () => {
  it('has every numeric field of every record type, in the record-type table unit', () => {
    const missing: string[] = [];
    for (const [type, spec] of Object.entries(RECORD_TYPE_SPECS)) {
      for (const [field, f] of Object.entries(spec.fields)) {
        // value and limit of an alert carry their rule's unit; the flag is a QC code, not a quantity.
        if (f.kind !== 'number' || field === 'flag' || type === 'alert') continue;
        const entry = METRICS[`${type}.${field}`];
        if (entry === undefined) missing.push(`${type}.${field}`);
        else expect(entry.unit, `${type}.${field}`).toBe(f.unit);
      }
    }
    expect(missing).toEqual([]);
  });

  it('names only fields that exist (record metrics) and ranges that are ranges', () => {
    for (const [name, spec] of Object.entries(METRICS)) {
      expect(spec.min, name).toBeLessThan(spec.max);
      const [type, field] = name.split('.') as [string, string];
      const rec = (RECORD_TYPE_SPECS as Record<string, { fields: Record<string, unknown> }>)[type];
      if (rec !== undefined && field !== 'battery_v') expect(rec.fields[field], name).toBeDefined();
    }
  });

  it('says which names a kind has when a metric is misspelt', () => {
    expect(unknownMetric('oxygen.o2_mg_l')).toBeUndefined();
    expect(unknownMetric('oxygen.o2_mgl')).toContain('oxygen.o2_mg_l');
    expect(unknownMetric('oxygn.o2_mg_l')).toContain('e.g. oxygen.o2_mg_l');
    expect(implausibleLimit('oxygen.o2_mg_l', 62.5)).toBe(
      '62.5 is outside what oxygen.o2_mg_l can be (0 to 30 mg L-1); check the unit',
    );
    expect(implausibleLimit('oxygen.o2_umol_kg', 62.5)).toBeUndefined();
  });
});

describe('alert rules in the configuration', () => {
  it('refuses a rule on a value reefd never computes (it would never fire)', () => {
    const r = alertsConfigSchema.safeParse({ rules: { hot: { metric: 'ctd.temperature', above: 32 } } });
    expect(messages(r)).toEqual([
      'rules.hot.metric: "ctd.temperature" is not a value reefd computes; ctd has ctd.temp_c, ctd.sal, ctd.battery_v',
    ]);
    expect(
      alertsConfigSchema.safeParse({ rules: { hot: { metric: 'ctd.temp_c', above: 32 } } }).success,
    ).toBe(true);
  });

  it('refuses limits in the wrong unit: a low-oxygen limit of 62.5 mg/L, a 120 V battery', () => {
    expect(messages(alertsConfigSchema.safeParse({ low_oxygen: { below: 62.5, clear: 70 } }))).toEqual([
      'low_oxygen.below: 62.5 is outside what oxygen.o2_mg_l can be (0 to 30 mg L-1); check the unit',
      'low_oxygen.clear: 70 is outside what oxygen.o2_mg_l can be (0 to 30 mg L-1); check the unit',
    ]);
    expect(
      messages(alertsConfigSchema.safeParse({ rules: { ph: { metric: 'carbonate.ph_total', below: 78 } } })),
    ).toEqual(['rules.ph.below: 78 is outside what carbonate.ph_total can be (6 to 9); check the unit']);
    expect(
      messages(alertsConfigSchema.safeParse({ faults: { battery: { below_v: { ctd: 120 } } } })).map(
        (m) => m.split(':')[0],
      ),
    ).toEqual(['faults.battery.below_v.ctd']);
    expect(alertsConfigSchema.safeParse({ low_oxygen: { below: 3, clear: 3.5 } }).success).toBe(true);
  });
});
