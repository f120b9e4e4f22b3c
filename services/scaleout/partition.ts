// Partitioning of raw messages on the Kafka raw topic (deploy/SCALING.md). The record key stays the
// contract's `<site>/<station>/<sensor>`; the partition is chosen from the site part of the key (or the
// site and station), hashed with the producer's default murmur2 partitioner. A transect needs both of its
// stations and a processor holds the state of one whole site, so the site is the unit that keeps every
// window whole; per-station partitioning is only right for sites without transects.
import { Partitioners, type PartitionerArgs } from 'kafkajs';

export type PartitionBy = 'site' | 'station';

/** The part of a `<site>/<station>/<sensor>` key that chooses the partition. */
export function partitionKeyOf(key: string, by: PartitionBy): string {
  const [site = '', station = ''] = key.split('/');
  return by === 'site' ? site : `${site}/${station}`;
}

/** The site of a raw record key, or undefined for a key that is not `<site>/<station>/<sensor>`. */
export function siteOfKey(key: string): string | undefined {
  const parts = key.split('/');
  return parts.length === 3 && parts[0] !== '' ? parts[0] : undefined;
}

/** A kafkajs partitioner factory that hashes the site (or site/station) instead of the whole key. */
export function createSitePartitioner(by: PartitionBy = 'site') {
  return () => {
    const inner = Partitioners.DefaultPartitioner();
    return (args: PartitionerArgs): number => {
      const key = args.message.key;
      if (key === null || key === undefined) return inner(args);
      const text = typeof key === 'string' ? key : key.toString('utf8');
      return inner({ ...args, message: { ...args.message, key: partitionKeyOf(text, by) } });
    };
  };
}

/** The partition the site partitioner gives a site on a topic of `partitions` partitions. */
export function partitionOfSite(site: string, partitions: number): number {
  const partitionMetadata = Array.from({ length: partitions }, (_, i) => ({
    partitionId: i,
    leader: 0,
    replicas: [0],
    isr: [0],
    partitionErrorCode: 0,
  }));
  return createSitePartitioner('site')()({
    topic: '-',
    partitionMetadata,
    message: { key: `${site}/-/-`, value: null },
  });
}
