import { describe, it, expect } from 'vitest';
import type { DerivedRecord } from '../contract/index.js';
import { formatPoint, recordToLine, recordToPoint } from './index.js';

const waves = {
  type: 'waves',
  site: 'demo-reef',
  station: 'crest',
  t: '2026-12-02T00:00:00.000Z',
  hm0_m: 0.42,
  tp_s: 11.5,
  tm01_s: null,
  tm02_s: 7.25,
  hrms_m: 0.3,
  hm0_ss_m: 0.4,
  hm0_ig_m: 0.05,
  depth_m: 2.1,
  sensor: 'p1',
  flags: { hm0_m: 1 },
} as unknown as DerivedRecord;

describe('recordToPoint', () => {
  it('maps a waves record: measurement = type, tags site+station+sensor, nulls and nested objects left out', () => {
    const r = recordToPoint(waves);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.point.measurement).toBe('waves');
    expect(r.point.tags).toEqual({ site: 'demo-reef', station: 'crest', sensor: 'p1' });
    expect(r.point.fields).toEqual({
      hm0_m: 0.42,
      tp_s: 11.5,
      tm02_s: 7.25,
      hrms_m: 0.3,
      hm0_ss_m: 0.4,
      hm0_ig_m: 0.05,
      depth_m: 2.1,
    });
    expect(r.point.timeMs).toBe(Date.UTC(2026, 11, 2));
  });

  // 2026-12-02T01:00Z = 1796173200000 ms since the epoch (common practice: 20789 days + 1 h).
  it('tags a flux with its transect and keeps booleans as booleans', () => {
    const flux = {
      type: 'flux',
      site: 's',
      transect: 'flat',
      t: '2026-12-02T01:00:00Z',
      ncp_mmol_m2_h: 12.5,
      nec_mmol_m2_h: null,
      nec_method: 'inverse',
      u_m_s: 0.1,
      depth_m: 1.5,
      residence_min: 58.3,
      valid: true,
    } as DerivedRecord;
    const r = recordToLine(flux, 'v2');
    expect(r).toEqual({
      ok: true,
      line: 'flux,site=s,transect=flat ncp_mmol_m2_h=12.5,nec_method="inverse",u_m_s=0.1,depth_m=1.5,residence_min=58.3,valid=true 1796173200000',
    });
  });

  it('refuses a record whose time does not parse', () => {
    expect(recordToPoint({ ...waves, t: 'yesterday' } as DerivedRecord)).toEqual({
      ok: false,
      reason: 'bad_time',
    });
  });

  it('escapes hostile ids in the whole line', () => {
    const line = formatPoint(
      {
        measurement: 'oxygen',
        tags: { site: 'a b', station: 'x,y=z"\\' },
        fields: { sensor: 'o"2\\', o2_mg_l: 6.5 },
        timeMs: 1,
      },
      'v2',
    );
    expect(line).toBe('oxygen,site=a\\ b,station=x\\,y\\=z"\\\\ sensor="o\\"2\\\\",o2_mg_l=6.5 1');
  });
});

describe('string fields for stores that keep numbers only', () => {
  it('leaves string fields out on request, keeps numbers and booleans', () => {
    const r = {
      type: 'alert',
      site: 's',
      t: '2026-03-01T00:00:00Z',
      station: 'a',
      rule: 'low_oxygen',
      class: 'threshold',
      state: 'raised',
      value: 1.9,
      limit: 2,
      id: '5e12ab03',
    } as unknown as Parameters<typeof recordToLine>[0];
    const kept = recordToLine(r, 'v2');
    const dropped = recordToLine(r, 'v2', { stringFields: false });
    expect(kept.ok && kept.line).toContain('id="5e12ab03"');
    expect(dropped.ok && dropped.line).not.toContain('5e12ab03');
    expect(dropped.ok && dropped.line).toContain('value=1.9');
  });
});
