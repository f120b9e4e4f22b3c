import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { parseConfigText } from '../../../libs/contract/index.js';
import type { AlertView, SensorView, SiteInfo } from '../api-schemas.js';
import { demoSiteConfig } from '../demo-records.js';
import { siteInfo } from '../site-info.js';
import { siteClock } from './format.js';
import { instrumentVerdict, reefVerdict } from './verdicts.js';
import { readFileSync } from 'node:fs';

type Rec = DerivedRecord & Record<string, unknown>;
const H = 3_600_000;
const NOW = Date.UTC(2026, 2, 1, 14, 0); // 04:00 at the site
const iso = (ms: number) => new Date(ms).toISOString();
const clock = siteClock('Pacific/Tahiti');
const site = siteInfo(demoSiteConfig(), { windowMs: 48 * H, resolutionMs: 6e5 });

const oxygen = (station: string, mgL: number, tMs = NOW - 5 * 60_000): Rec =>
  ({
    type: 'oxygen',
    site: 'ornen-reef',
    t: iso(tMs),
    station,
    sensor: `o2-${station}`,
    o2_umol_kg: mgL * 31,
    o2_sat_pct: 80,
    o2_mg_l: mgL,
  }) as Rec;
const carbonate = (station: string, omega: number, tempC = 27.2): Rec =>
  ({
    type: 'carbonate',
    site: 'ornen-reef',
    t: iso(NOW - 6e5),
    station,
    ta_umol_kg: 2290,
    dic_umol_kg: 1990,
    ph_total: 8.0,
    pco2_uatm: 420,
    co3_umol_kg: 220,
    omega_ar: omega,
    omega_ca: omega * 1.5,
    ta_source: 'salinity',
    temp_c: tempC,
  }) as Rec;
const latest = (...recs: Rec[]) => new Map(recs.map((r) => [`${r.type}|${String(r.station)}`, r]));
const view = (p: Partial<AlertView>): AlertView => ({
  id: 'a1',
  rule: 'low_oxygen',
  class: 'threshold',
  state: 'raised',
  severity: 'critical',
  station: 'lagoon',
  sensor: 'o2-lagoon',
  metric: 'oxygen.o2_mg_l',
  fault: null,
  value: 1.42,
  limit: 2,
  unit: 'mg L-1',
  label: 'dissolved oxygen',
  raised_t: iso(NOW - 2 * H),
  cleared_t: null,
  t: iso(NOW - 2 * H),
  ack: null,
  can_ack: true,
  ...p,
});
const healthy = ['crest', 'flat', 'back'].flatMap((s) => [oxygen(s, 5.8), carbonate(s, 3.6)]);

describe('reef verdict', () => {
  it('names the worst station against the site limit when an alert is raised', () => {
    // The lagoon's saturation state is further past its limit, but low oxygen is the critical rule.
    const omega = view({
      id: 'a2',
      rule: 'low_omega_ar',
      metric: 'carbonate.omega_ar',
      severity: 'warning',
      value: 1.9,
      limit: 3,
    });
    const v = reefVerdict(
      site,
      latest(...healthy, oxygen('lagoon', 1.42), carbonate('lagoon', 1.9)),
      [omega, view({})],
      [],
      NOW,
      clock,
    );
    expect(v.level).toBe('alarm');
    expect(v.station).toBe('lagoon');
    expect(v.headline).toBe('Low oxygen at Lagoon patch reef');
    expect(v.detail).toBe("Dissolved oxygen 1.42 mg/L, below the site's limit of 2.00 mg/L since 02:00.");
    expect(v.byStation.get('crest')).toBe('ok');
    expect(v.byStation.get('lagoon')).toBe('alarm');
  });

  it('watches a value past the limit or in the band before the clear, before any alert', () => {
    const v = reefVerdict(site, latest(...healthy, oxygen('lagoon', 2.3)), [], [], NOW, clock);
    expect(v.level).toBe('watch');
    expect(v.headline).toBe('Low oxygen at Lagoon patch reef');
    expect(v.detail).toBe("Dissolved oxygen 2.30 mg/L: close to the site's limit of 2.00 mg/L.");
  });

  it("judges by the site's own limits: the same water is fine at one site and not at another", () => {
    const recs = latest(...healthy, oxygen('lagoon', 3.4));
    expect(reefVerdict(site, recs, [], [], NOW, clock).level).toBe('ok');
    const text = readFileSync(new URL('../../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8');
    const strict = parseConfigText(`${text}\nalerts:\n  low_oxygen: { below: 3.5, clear: 4.0 }\n`);
    if (!strict.ok) throw new Error('config');
    const strictSite: SiteInfo = siteInfo(strict.config, { windowMs: 48 * H, resolutionMs: 6e5 });
    const v = reefVerdict(strictSite, recs, [], [], NOW, clock);
    expect(v.level).toBe('watch');
    expect(v.detail).toContain('3.50 mg/L');
  });

  it("warns of tonight's forecast below the limit, and knows when values are too old to judge", () => {
    const forecast = {
      type: 'forecast',
      site: 'ornen-reef',
      t: iso(NOW - H),
      station: 'lagoon',
      o2_min_mg_l: 1.6,
      o2_min_lo_mg_l: 1.2,
      o2_min_hi_mg_l: 2.1,
      t_min: iso(NOW + 2 * H),
      horizon_h: 3,
    } as Rec;
    const v = reefVerdict(site, latest(...healthy, oxygen('lagoon', 4.1)), [], [forecast], NOW, clock);
    expect(v.level).toBe('watch');
    expect(v.headline).toBe('Low oxygen expected tonight at Lagoon patch reef');
    expect(v.detail).toBe(
      'Lowest oxygen before sunrise expected 1.60 mg/L around 06:00 (80 % between 1.20 mg/L and 2.10 mg/L).',
    );
    const old = reefVerdict(site, latest(oxygen('lagoon', 5, NOW - 5 * H)), [], [], NOW, clock);
    expect(old.level).toBe('unknown');
  });
});

describe('instrument verdict and alert words', () => {
  const sensor = (p: Partial<SensorView>): SensorView => ({
    station: 'back',
    sensor: 'x',
    kind: 'ctd',
    label: 'x',
    state: 'ok',
    state_reason: 'ok',
    last_seen: iso(NOW),
    expected_interval_s: 300,
    expected_source: 'usual',
    last_gap_s: 300,
    qc_flag: 1,
    qc_reason: null,
    faults: [],
    battery_v: 12.6,
    battery_limit_v: 10.5,
    battery_trend_v_per_day: null,
    battery_hours_left: null,
    battery_series: [],
    last_values: [],
    calibrations: [],
    logbook: [],
    ...p,
  });

  it('counts sensors by state and names the failing one with its fault and since when', () => {
    const sensors = [
      sensor({ sensor: 'ctd-back' }),
      sensor({
        sensor: 'co2-flat',
        station: 'flat',
        kind: 'pco2',
        label: 'co2-flat',
        state: 'suspect',
        state_reason: 'battery_trend',
        battery_v: 11.7,
        battery_limit_v: 11.5,
        battery_hours_left: 5,
      }),
      sensor({
        sensor: 'co2-back',
        kind: 'pco2',
        label: 'co2-back',
        state: 'failing',
        state_reason: 'flatline',
        faults: [
          {
            id: 'f1',
            fault: 'flatline',
            rule: 'flatline',
            field: 'pco2_uatm',
            since: iso(NOW - 4.5 * H),
            value: 512,
            limit: null,
            unit: 'uatm',
          },
        ],
      }),
    ];
    const v = instrumentVerdict(sensors, [], site, clock, NOW);
    expect(v.level).toBe('alarm');
    expect(v.summary).toBe('1 failing · 1 to check · 1 working');
    expect(v.headline).toBe('co2-back (pCO₂ sensor) at Back reef');
    expect(v.detail).toBe('Value frozen (flat line) since yesterday 23:30.');
    expect(v.ranked.map((s) => s.sensor)).toEqual(['co2-back', 'co2-flat']);
    const ok = instrumentVerdict([sensor({}), sensor({ sensor: 'y' })], [], site, clock, NOW);
    expect(ok).toMatchObject({ level: 'ok', headline: 'All 2 sensors working' });
  });
});
