import { describe, expect, it } from 'vitest';
import type { AlertView } from '../api-schemas.js';
import { demoSiteConfig } from '../demo-records.js';
import { siteInfo } from '../site-info.js';
import { siteClock } from './format.js';
import { alertWords, forecastLine, reasonWords } from './words.js';

const H = 3_600_000;
const NOW = Date.UTC(2026, 2, 1, 14, 0); // 04:00 at the site
const iso = (ms: number) => new Date(ms).toISOString();
const clock = siteClock('Pacific/Tahiti');
const site = siteInfo(demoSiteConfig(), { windowMs: 48 * H, resolutionMs: 6e5 });
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

describe('words for people', () => {
  it('writes alerts with units and plain words', () => {
    const low = alertWords(view({}), site, clock, NOW);
    expect(low).toEqual({
      title: 'Low oxygen at Lagoon patch reef',
      detail: "Dissolved oxygen 1.42 mg/L when raised, below the site's limit of 2.00 mg/L.",
      when: '02:00, 2 h ago',
    });
    const stale = alertWords(
      view({
        class: 'fault',
        rule: 'stale',
        fault: 'stale',
        metric: null,
        sensor: 'ctd-lagoon',
        value: 900,
        limit: 900,
        unit: 's',
      }),
      site,
      clock,
      NOW,
    );
    expect(stale.title).toBe('No messages: ctd-lagoon at Lagoon patch reef');
    expect(stale.detail).toBe('No message for longer than 15 min (about 3 usual intervals).');
    const bat = alertWords(
      view({
        class: 'fault',
        rule: 'battery',
        fault: 'battery',
        metric: 'pco2.battery_v',
        sensor: 'co2-flat',
        station: 'flat',
        value: 11.43,
        limit: 11.5,
        unit: 'V',
        label: 'supply voltage',
      }),
      site,
      clock,
      NOW,
    );
    expect(bat.detail).toBe('Supply 11.43 V, below the limit of 11.50 V.');
    const cleared = alertWords(
      view({ state: 'cleared', value: 2.51, limit: 2.5, cleared_t: iso(NOW - H), t: iso(NOW - H) }),
      site,
      clock,
      NOW,
    );
    expect(cleared.detail).toBe('Back to 2.51 mg/L (clears above 2.50 mg/L).');
    expect(cleared.when).toBe('02:00, cleared 03:00 (after 60 min)');
    expect(reasonWords('storage_dominates,input_fault:back/co2-back/flatline')).toBe(
      'change in the water dominates the budget (dawn or dusk); co2-back at back: value frozen (flat line)',
    );
    // A single failed reading (a spike flagged 4) names its sensor and station, not the raw code.
    expect(reasonWords('input_qc_failed:crest/o2-crest,input_qc_failed')).toBe(
      'o2-crest at crest: a reading failed quality control; an input failed quality control',
    );
  });

  it('words the battery trend warning in hours and the site-wide silence on its own', () => {
    const trend = alertWords(
      view({
        class: 'fault',
        rule: 'battery_trend',
        fault: 'battery',
        metric: 'pco2.battery_v',
        sensor: 'co2-flat',
        station: 'flat',
        value: 4.5,
        limit: 6,
        unit: 'h',
      }),
      site,
      clock,
      NOW,
    );
    expect(trend.title).toBe('Battery running down: co2-flat at Mid flat');
    expect(trend.detail).toBe('At its recent rate the supply reaches its cut-off in about 4 h 30 min.');
    const silent = alertWords(
      view({
        class: 'fault',
        rule: 'site_silent',
        fault: 'silent',
        metric: null,
        station: null,
        sensor: null,
        value: 1200,
        limit: 900,
        unit: 's',
      }),
      site,
      clock,
      NOW,
    );
    expect(silent.title).toBe('Site silent');
    expect(silent.detail).toBe(
      'No message from the site for longer than 15 min: the uplink, the broker or the power.',
    );
  });
});

describe("the forecast's line on the oxygen plot", () => {
  const clock = siteClock('Pacific/Tahiti'); // UTC-10
  const T = Date.UTC(2026, 2, 1, 14, 45); // 04:45 at the site
  const mark = {
    tMinS: T / 1000,
    minMgL: 1.079,
    loMgL: 0.8,
    hiMgL: 1.4,
    issuedMs: T - 3_600_000,
    rec: {} as never,
  };
  it('gives the forecast with its interval in the unit of the site, and the water then', () => {
    const head = 'Forecast issued 03:45: lowest 1.08 mg/L around 04:45, 80 % between 0.80 mg/L and 1.40 mg/L';
    expect(forecastLine(mark, null, 'mg L-1', clock, T - 60_000)).toBe(`${head} · still ahead`);
    expect(forecastLine(mark, null, 'mg L-1', clock, T + 60_000)).toBe(`${head} · no reading near that time`);
    expect(forecastLine(mark, { value: 1.234, tMs: T + 300_000 }, 'mg L-1', clock, T + 3_600_000)).toBe(
      `${head} · observed 1.23 mg/L at 04:50, within the interval`,
    );
    expect(forecastLine(mark, { value: 1.5, tMs: T }, 'mg L-1', clock, T + 3_600_000)).toMatch(
      /observed 1\.50 mg\/L at 04:45, outside the interval$/,
    );
  });
});
