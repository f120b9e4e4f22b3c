import { describe, it, expect } from 'vitest';
import { partitionKeyOf, partitionOfSite, siteOfKey } from './partition.js';

describe('site partitioning', () => {
  it('takes the site (or site/station) from the contract key', () => {
    expect(partitionKeyOf('ornen-reef/crest/p-crest', 'site')).toBe('ornen-reef');
    expect(partitionKeyOf('ornen-reef/crest/p-crest', 'station')).toBe('ornen-reef/crest');
    expect(siteOfKey('ornen-reef/crest/p-crest')).toBe('ornen-reef');
    expect(siteOfKey('no-slashes')).toBeUndefined();
  });

  it('puts every station of a site on one partition and spreads sites', () => {
    // murmur2 of the site bytes, positive-masked, modulo the partition count (common practice: the
    // Java client's default partitioner, which the kafkajs DefaultPartitioner reproduces).
    const counts = new Array<number>(8).fill(0);
    for (let i = 0; i < 800; i++) {
      const p = partitionOfSite(`site-${i}`, 8);
      expect(p).toBeGreaterThanOrEqual(0);
      expect(p).toBeLessThan(8);
      counts[p] = (counts[p] ?? 0) + 1;
    }
    // 800 sites over 8 partitions: 100 each expected; a uniform hash stays within +-40 (4 sigma).
    for (const c of counts) expect(Math.abs(c - 100)).toBeLessThan(40);
    expect(partitionOfSite('site-1', 8)).toBe(partitionOfSite('site-1', 8));
  });
});
