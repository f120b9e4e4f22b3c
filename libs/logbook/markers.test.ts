import { describe, expect, it } from 'vitest';
import type { LogbookEntry } from '../contract/index.js';
import { logbookMarkers } from './markers.js';

const ms = (s: string) => Date.parse(s);
const entries: LogbookEntry[] = [
  {
    t: '2026-07-15T09:40:00Z',
    station: 'back',
    sensor: 'adcp-back',
    event: 'relevel',
    text: 'diver bumped the frame; re-levelled it against the spirit level on the mounting plate, took photos',
    exclude_from: '2026-07-15T09:20:00Z',
    exclude_to: '2026-07-15T10:10:00Z',
  },
  { t: '2026-07-15T08:00:00+10:00', station: 'flat', event: 'cleaning', text: 'wiped optode\nand CTD' },
  { t: '2026-07-16T08:00:00Z', station: 'back', event: 'note' },
];

describe('logbookMarkers', () => {
  it('gives the events in the range and the exclusions overlapping it, in time order, times in UTC', () => {
    const m = logbookMarkers(entries, {
      fromMs: ms('2026-07-14T00:00:00Z'),
      toMs: ms('2026-07-16T00:00:00Z'),
    });
    expect(m.map((x) => x.t)).toEqual(['2026-07-14T22:00:00.000Z', '2026-07-15T09:40:00.000Z']);
    expect(m[0]?.label).toBe('cleaning: wiped optode');
    expect(m[0]?.sensor).toBeNull();
    expect(m[0]?.exclusion).toBeNull();
    expect(m[1]?.label).toHaveLength(60);
    expect(m[1]?.label.startsWith('relevel adcp-back: diver bumped the frame')).toBe(true);
    expect(m[1]?.exclusion).toEqual({
      fromMs: ms('2026-07-15T09:20:00Z'),
      toMs: ms('2026-07-15T10:10:00Z'),
      from: '2026-07-15T09:20:00.000Z',
      to: '2026-07-15T10:10:00.000Z',
    });
  });

  it('keeps an exclusion that overlaps the range although its event is outside', () => {
    const m = logbookMarkers(entries, {
      fromMs: ms('2026-07-15T10:00:00Z'),
      toMs: ms('2026-07-15T11:00:00Z'),
    });
    expect(m.map((x) => x.event)).toEqual(['relevel']);
    expect(
      logbookMarkers(entries, { fromMs: ms('2026-07-15T10:10:00Z'), toMs: ms('2026-07-15T11:00:00Z') }),
    ).toEqual([]);
  });

  it('filters by station, and by sensor keeping the station-wide entries', () => {
    const all = { fromMs: 0, toMs: ms('2027-01-01T00:00:00Z') };
    expect(logbookMarkers(entries, { ...all, station: 'back' }).map((x) => x.event)).toEqual([
      'relevel',
      'note',
    ]);
    expect(
      logbookMarkers(entries, { ...all, station: 'back', sensor: 'ctd-back' }).map((x) => x.event),
    ).toEqual(['note']);
    expect(
      logbookMarkers(entries, { ...all, station: 'flat', sensor: 'o2-flat' }).map((x) => x.event),
    ).toEqual(['cleaning']);
  });
});
