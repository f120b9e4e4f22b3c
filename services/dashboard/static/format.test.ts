import { describe, expect, it } from 'vitest';
import { siteInfo } from '../site-info.js';
import { demoSiteConfig } from '../demo-records.js';
import { ago, duration, num, siteClock, tickLabels, unitText, withUnit } from './format.js';

describe('units for print', () => {
  it('writes every unit the daemon serves without UDUNITS spelling', () => {
    const site = siteInfo(demoSiteConfig(), { windowMs: 48 * 3.6e6, resolutionMs: 6e5 });
    const units = new Set<string>();
    for (const t of Object.values(site.record_types))
      for (const f of Object.values(t.fields)) units.add(f.unit);
    for (const u of units) expect(unitText(u), u).not.toMatch(/(^|\s)u(mol|atm)|-\d|_/);
    expect(unitText('mg L-1')).toBe('mg/L');
    expect(unitText('umol kg-1')).toBe('µmol/kg');
    expect(unitText('m s-1')).toBe('m/s');
    expect(unitText('mmol m-2 h-1')).toBe('mmol m⁻² h⁻¹');
    expect(unitText('umol m-2 s-1')).toBe('µmol m⁻² s⁻¹');
    expect(unitText('uatm')).toBe('µatm');
    expect(unitText('degree_Celsius')).toBe('°C');
    expect(unitText('1')).toBe('');
  });

  it('writes values with their unit and the decimals the trade reads', () => {
    expect(withUnit(1.4235, 'mg L-1', 'o2_mg_l')).toBe('1.42 mg/L');
    expect(withUnit(27.456, 'degree_Celsius', 'temp_c')).toBe('27.46 °C');
    expect(withUnit(8.01234, '1', 'ph_total')).toBe('8.012');
    expect(withUnit(412.6, 'uatm')).toBe('413 µatm');
    expect(withUnit(-3.25, 'mmol m-2 h-1')).toBe('−3.25 mmol m⁻² h⁻¹');
    expect(withUnit(92.4, 'percent')).toBe('92.4%');
    expect(withUnit(null, 'mg L-1')).toBe('—');
    expect(num(Number.NaN)).toBe('—');
  });

  it('labels axis ticks with the decimals their spacing needs, the same on every tick', () => {
    expect(tickLabels([-100, -50, 0, 50, 100])).toEqual(['−100', '−50', '0', '50', '100']);
    expect(tickLabels([7.8, 7.9, 8.0])).toEqual(['7.8', '7.9', '8.0']);
    expect(tickLabels([35.1, 35.11, 35.12])).toEqual(['35.10', '35.11', '35.12']);
    expect(tickLabels([2.5])).toEqual(['2.50']);
  });

  it('says lengths of time in words', () => {
    expect(duration(45_000)).toBe('45 s');
    expect(duration(15 * 60_000)).toBe('15 min');
    expect(duration(95 * 60_000)).toBe('1 h 35 min');
    expect(duration(50 * 3_600_000)).toBe('2 d 2 h');
    expect(ago(10_000)).toBe('just now');
  });
});

describe('site clock', () => {
  // The demo site lives at UTC-10 (Pacific/Tahiti, no daylight saving): its 13:27 UTC is 03:27 at the site.
  const clock = siteClock('Pacific/Tahiti');
  const at = Date.UTC(2026, 2, 1, 13, 27);
  it('gives local times, the offset, and UTC on request', () => {
    expect(clock.time(at)).toBe('03:27');
    expect(clock.offset(at)).toBe('UTC−10');
    expect(clock.utc(at)).toBe('13:27 UTC 1 Mar');
    expect(clock.date(at)).toBe('2026-03-01');
    expect(clock.day(Date.UTC(2026, 2, 1, 9))).toBe('Sat 28 Feb'); // 23:00 the evening before, locally
  });
  it('names the day relative to now at the site', () => {
    expect(clock.when(at, at + 3_600_000)).toBe('03:27');
    expect(clock.when(at - 86_400_000, at)).toBe('yesterday 03:27');
    expect(clock.when(at - 3 * 86_400_000, at)).toBe('Thu 26 Feb 03:27');
    expect(siteClock('UTC').offset(at)).toBe('UTC');
  });
});
