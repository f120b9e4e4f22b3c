import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { AlertView, FieldLog } from './api-schemas.js';
import { demoSiteConfig } from './demo-records.js';
import { batteryTrendVPerDay, SensorWatch, type SensorHealthRow } from './sensor-watch.js';

const MIN = 60_000;
const H = 60 * MIN;
const T0 = Date.UTC(2026, 2, 1);
const iso = (ms: number) => new Date(ms).toISOString();
const config = demoSiteConfig();
const noLog: FieldLog = { calibrations: [], logbook: [], problems: [] };

function fault(p: Partial<AlertView> & Pick<AlertView, 'station' | 'sensor' | 'fault'>): AlertView {
  return {
    id: 'f00d0001',
    rule: p.fault as string,
    class: 'fault',
    state: 'raised',
    severity: 'warning',
    metric: null,
    value: null,
    limit: null,
    unit: '',
    label: '',
    raised_t: iso(T0),
    cleared_t: null,
    t: iso(T0),
    ack: null,
    can_ack: true,
    ...p,
  };
}

describe('batteryTrendVPerDay', () => {
  it('is the least-squares slope over the last 12 h (a known linear fall)', () => {
    const t: number[] = [];
    const v: number[] = [];
    // 24 h at 10 min: flat at 12.6 V for 12 h, then falling 0.8 V a day (the fit sees the last 12 h only).
    for (let i = 0; i <= 144; i++) {
      t.push(T0 + i * 10 * MIN);
      v.push(i <= 72 ? 12.6 : 12.6 - (0.8 * (i - 72) * 10 * MIN) / (24 * H));
    }
    expect(batteryTrendVPerDay(t, v)).toBeCloseTo(-0.8, 6);
    expect(batteryTrendVPerDay(t.slice(0, 3), v.slice(0, 3))).toBeNull(); // too few points
  });
});

describe('SensorWatch', () => {
  it('learns intervals and the battery trend from the processor rows, and names the failing sensor', () => {
    let wall = 0;
    let rows: SensorHealthRow[] = [];
    const w = new SensorWatch({ config, health: () => rows, minPollMs: 0, wallClock: () => wall });
    // co2-flat: a message every 10 min for 12 h with a battery falling 1.2 V/day from 12.2 V.
    for (let i = 0; i <= 72; i++) {
      const tMs = T0 + i * 10 * MIN;
      rows = [
        {
          station: 'flat',
          sensor: 'co2-flat',
          kind: 'pco2',
          lastSeenMs: tMs,
          batteryV: 12.2 - (1.2 * i) / 144,
          flag: 1,
        },
        { station: 'back', sensor: 'co2-back', kind: 'pco2', lastSeenMs: tMs, batteryV: 12.6, flag: 3 },
      ];
      wall += 1000;
      w.observe([]);
    }
    const rec: DerivedRecord = {
      type: 'current',
      site: 'ornen-reef',
      t: iso(T0 + 12 * H),
      station: 'crest',
      sensor: 'adcp-crest',
      east_m_s: null,
      north_m_s: null,
      u_m_s: null,
      v_m_s: null,
      speed_m_s: null,
      dir_to_deg: null,
      bins_used: 1,
      flag: 4,
      reason: 'too_few_bins',
    } as DerivedRecord;
    w.observe([rec]);
    const flat = fault({
      station: 'back',
      sensor: 'co2-back',
      fault: 'flatline',
      metric: 'pco2.pco2_uatm',
      unit: 'uatm',
      value: 512.3,
    });
    // The processor's battery trend warning (rule battery_trend, fault battery, value = hours left).
    const trend = fault({
      id: 'f00d0002',
      station: 'flat',
      sensor: 'co2-flat',
      fault: 'battery',
      rule: 'battery_trend',
      metric: 'pco2.battery_v',
      unit: 'h',
      value: 2,
      limit: 6,
    });
    expect(w.views([flat], noLog).find((v) => v.sensor === 'co2-flat')?.state).toBe('ok'); // no warning raised
    const views = w.views([flat, trend], noLog);
    const by = (s: string) => views.find((v) => v.sensor === s)!;
    expect(views).toHaveLength(
      Object.values(config.stations).reduce((n, s) => n + Object.keys(s.sensors).length, 0),
    );
    expect(by('co2-flat')).toMatchObject({
      state: 'suspect', // warned, still working: 11.6 V falling 1.2 V/day reaches 11.5 V in about 2 h
      state_reason: 'battery_trend',
      expected_interval_s: 600,
      expected_source: 'usual',
      last_gap_s: 600,
      battery_limit_v: 11.5,
    });
    expect(by('co2-flat').battery_trend_v_per_day).toBeCloseTo(-1.2, 6);
    expect(by('co2-flat').battery_hours_left).toBeCloseTo(((11.6 - 11.5) / 1.2) * 24, 6);
    expect(by('co2-back')).toMatchObject({
      state: 'failing',
      state_reason: 'flatline',
      qc_flag: 3,
      faults: [{ fault: 'flatline', since: iso(T0), value: 512.3, unit: 'uatm' }],
    });
    expect(by('adcp-crest')).toMatchObject({
      state: 'suspect',
      state_reason: 'too_few_bins',
      qc_flag: 4,
      qc_reason: 'too_few_bins',
    });
    expect(by('met')).toMatchObject({ state: 'unknown', last_seen: null });
  });

  it('shows a CTD its values as the carbonate record used them, and its calibration and log entries', () => {
    const w = new SensorWatch({ config });
    w.observe([
      {
        type: 'carbonate',
        site: 'ornen-reef',
        t: iso(T0),
        station: 'back',
        sensor: 'co2-back',
        ta_umol_kg: 2290,
        dic_umol_kg: 1980,
        ph_total: 8.01,
        pco2_uatm: 420,
        co3_umol_kg: 220,
        omega_ar: 3.6,
        omega_ca: 5.4,
        ta_source: 'salinity',
        temp_c: 27.4,
        sal: 35.1,
        flag: 1,
      } as DerivedRecord,
    ]);
    const log: FieldLog = {
      calibrations: [
        {
          sensor: 'back/ctd-back',
          field: 'sal',
          from: null,
          to: null,
          slope: 1,
          offset: -0.05,
          drift_per_day: 0,
          slope_drift_per_day: 0,
        },
      ],
      logbook: [
        {
          t: iso(T0),
          station: 'back',
          sensor: null,
          event: 'cleaning',
          text: 'wiped all heads',
          exclude_from: null,
          exclude_to: null,
        },
        {
          t: iso(T0),
          station: 'back',
          sensor: 'o2-back',
          event: 'swap',
          text: 'new optode',
          exclude_from: null,
          exclude_to: null,
        },
      ],
      problems: [],
    };
    const ctd = w.views([], log).find((v) => v.sensor === 'ctd-back')!;
    expect(ctd.last_values).toEqual([
      { field: 'temp_c', value: 27.4, unit: 'degree_Celsius', label: 'water temperature', t: iso(T0) },
      { field: 'sal', value: 35.1, unit: '1', label: 'practical salinity', t: iso(T0) },
    ]);
    expect(ctd.calibrations).toHaveLength(1);
    expect(ctd.logbook.map((e) => e.event)).toEqual(['cleaning']); // the station's entry, not the optode's
  });
});
