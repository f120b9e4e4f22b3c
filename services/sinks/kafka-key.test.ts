import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { kafkaKey } from './kafka-sink.js';

const rec = (r: Record<string, unknown>) => r as unknown as DerivedRecord;

describe('the Kafka key of a derived record', () => {
  it('keys station records by station and transect records (budgets, days) by transect', () => {
    expect(kafkaKey(rec({ type: 'carbonate', site: 'ornen', station: 'bf1', sensor: 'p1' }))).toBe(
      'ornen/bf1',
    );
    expect(kafkaKey(rec({ type: 'forecast', site: 'ornen', station: 'lg1' }))).toBe('ornen/lg1');
    expect(kafkaKey(rec({ type: 'flux', site: 'ornen', transect: 'outer' }))).toBe('ornen/outer');
    // A daily record has a transect and no station: it shares its transect's partition with the windows it
    // closes (the key read from the type alone sent every day of every transect to one key).
    expect(kafkaKey(rec({ type: 'daily', site: 'ornen', transect: 'inner', day: '2026-03-01' }))).toBe(
      'ornen/inner',
    );
  });

  it('a site-wide record has a placeholder place', () => {
    expect(kafkaKey(rec({ type: 'alert', site: 'ornen', rule: 'site_silent' }))).toBe('ornen/-');
  });
});
