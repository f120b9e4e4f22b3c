// Local days of an IANA time zone (contract `timezone`; docs/methods/daily.md 10.1). The runtime's
// time-zone database answers through Intl.DateTimeFormat (no clock, no I/O: the answer depends only on the
// instant and the zone), so daylight-saving days come out 23 or 25 h long and a zone whose midnight is
// skipped starts its day at the first local instant that exists.
import { DailyError } from './errors.js';

export interface LocalDayBounds {
  /** The local date, YYYY-MM-DD. */
  day: string;
  /** First instant of the local day and of the next, ms since the epoch (UTC). */
  startMs: number;
  endMs: number;
  /** endMs - startMs in hours: 24, or 23/25 on daylight-saving changes. */
  hours: number;
}

export interface LocalCalendar {
  readonly timeZone: string;
  /** Local date (YYYY-MM-DD) of an instant. */
  localDate(tMs: number): string;
  /** Local wall-clock time minus UTC at an instant, ms. */
  offsetMs(tMs: number): number;
  /** The bounds of a local date. */
  dayBounds(day: string): LocalDayBounds;
  /** The bounds of the local day that contains an instant. */
  dayOf(tMs: number): LocalDayBounds;
}

const DAY_MS = 86_400_000;
const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** The calendar date after `day` (YYYY-MM-DD), by proleptic Gregorian arithmetic. */
export function nextDate(day: string, by = 1): string {
  const m = DATE_RE.exec(day);
  if (!m) throw new DailyError('REEFD_DAILY_BAD_OPTIONS', `day "${day}" is not YYYY-MM-DD`);
  return new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]) + by)).toISOString().slice(0, 10);
}

/** A calendar for one zone. Throws REEFD_DAILY_BAD_TIMEZONE for a name the runtime does not know.
 * Check: America/New_York 2026-03-08 is 23 h, 2026-11-01 is 25 h (the US rule: second Sunday of March,
 * first Sunday of November, common practice). */
export function createLocalCalendar(timeZone: string): LocalCalendar {
  let fmt: Intl.DateTimeFormat;
  try {
    fmt = new Intl.DateTimeFormat('en-US', {
      timeZone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
    });
  } catch {
    throw new DailyError('REEFD_DAILY_BAD_TIMEZONE', `timezone "${timeZone}"`);
  }
  const fields = (tMs: number) => {
    const out = { year: 0, month: 0, day: 0, hour: 0, minute: 0, second: 0 };
    for (const p of fmt.formatToParts(new Date(tMs))) {
      if (p.type in out) out[p.type as keyof typeof out] = Number(p.value);
    }
    return out;
  };
  const localDate = (tMs: number) => {
    const f = fields(tMs);
    return `${String(f.year).padStart(4, '0')}-${String(f.month).padStart(2, '0')}-${String(f.day).padStart(2, '0')}`;
  };
  const offsetMs = (tMs: number) => {
    const f = fields(tMs);
    const wall = Date.UTC(f.year, f.month - 1, f.day, f.hour, f.minute, f.second);
    return wall - Math.floor(tMs / 1000) * 1000;
  };
  /** First instant whose local date is >= day. */
  const startOf = (day: string): number => {
    const m = DATE_RE.exec(day);
    if (!m) throw new DailyError('REEFD_DAILY_BAD_OPTIONS', `day "${day}" is not YYYY-MM-DD`);
    const utcMidnight = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
    for (const probe of [utcMidnight, utcMidnight - DAY_MS / 2, utcMidnight + DAY_MS / 2]) {
      const t = utcMidnight - offsetMs(probe);
      if (localDate(t) === day && localDate(t - 1) < day) return t;
    }
    // Midnight does not exist on this date (a forward change at 00:00): bisect for the first instant.
    let lo = utcMidnight - 15 * 3_600_000; // local date still before `day` in every zone (UTC+14 at most)
    let hi = utcMidnight + 15 * 3_600_000;
    while (hi - lo > 1) {
      const mid = Math.floor((lo + hi) / 2);
      if (localDate(mid) < day) lo = mid;
      else hi = mid;
    }
    return hi;
  };
  const dayBounds = (day: string): LocalDayBounds => {
    const startMs = startOf(day);
    const endMs = startOf(nextDate(day));
    return { day, startMs, endMs, hours: (endMs - startMs) / 3_600_000 };
  };
  return {
    timeZone,
    localDate,
    offsetMs,
    dayBounds,
    dayOf: (tMs) => dayBounds(localDate(tMs)),
  };
}
