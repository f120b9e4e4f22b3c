import { describe, expect, it } from 'vitest';
import { DailyError } from './errors.js';
import { createLocalCalendar, nextDate } from './local-day.js';

const H = 3_600_000;

describe('local days of an IANA zone (Intl time-zone database)', () => {
  it('UTC days are 24 h from midnight', () => {
    const c = createLocalCalendar('UTC');
    const b = c.dayBounds('2026-06-10');
    expect(b.startMs).toBe(Date.UTC(2026, 5, 10));
    expect(b.hours).toBe(24);
    expect(c.localDate(Date.UTC(2026, 5, 10, 23, 59, 59, 999))).toBe('2026-06-10');
  });

  it('a fixed-offset zone: Etc/GMT+10 is UTC-10 (the POSIX sign convention, common practice)', () => {
    const c = createLocalCalendar('Etc/GMT+10');
    expect(c.dayBounds('2026-06-10').startMs).toBe(Date.UTC(2026, 5, 10, 10));
    expect(c.offsetMs(Date.UTC(2026, 5, 10))).toBe(-10 * H);
    expect(c.localDate(Date.UTC(2026, 5, 10, 9, 59))).toBe('2026-06-09');
  });

  it('daylight-saving days are 23 and 25 h (America/New_York 2026: Mar 8 and Nov 1, the US rule)', () => {
    const c = createLocalCalendar('America/New_York');
    const spring = c.dayBounds('2026-03-08');
    expect(spring.startMs).toBe(Date.UTC(2026, 2, 8, 5));
    expect(spring.hours).toBe(23);
    const autumn = c.dayBounds('2026-11-01');
    expect(autumn.startMs).toBe(Date.UTC(2026, 10, 1, 4));
    expect(autumn.hours).toBe(25);
    expect(c.dayBounds('2026-11-02').hours).toBe(24);
  });

  it('a day whose midnight is skipped starts at the first local instant (America/Santiago, 2024-09-08)', () => {
    const c = createLocalCalendar('America/Santiago');
    const b = c.dayBounds('2024-09-08');
    expect(c.localDate(b.startMs)).toBe('2024-09-08');
    expect(c.localDate(b.startMs - 1)).toBe('2024-09-07');
    expect(b.hours).toBe(23);
    // The clock went from 00:00 at UTC-4 to 01:00 at UTC-3: the day starts at 04:00 UTC.
    expect(b.startMs).toBe(Date.UTC(2024, 8, 8, 4));
  });

  it('every instant of a year falls inside the bounds of its own local day', () => {
    const c = createLocalCalendar('Australia/Lord_Howe'); // half-hour daylight saving (common practice)
    for (let t = Date.UTC(2026, 0, 1); t < Date.UTC(2027, 0, 1); t += 7 * H + 13 * 60_000) {
      const b = c.dayOf(t);
      expect(t).toBeGreaterThanOrEqual(b.startMs);
      expect(t).toBeLessThan(b.endMs);
    }
    expect(c.dayBounds('2026-04-05').hours).toBe(24.5);
  });

  it('unknown zones and malformed dates are refused with the catalogue code', () => {
    expect(() => createLocalCalendar('Ornen/Reef')).toThrow(DailyError);
    expect(() => createLocalCalendar('Ornen/Reef')).toThrow(/REEFD_DAILY_BAD_TIMEZONE.*Ornen\/Reef/);
    expect(() => nextDate('10/06/2026')).toThrow(/REEFD_DAILY_BAD_OPTIONS/);
    expect(nextDate('2026-12-31')).toBe('2027-01-01');
    expect(nextDate('2028-03-01', -1)).toBe('2028-02-29');
  });
});
