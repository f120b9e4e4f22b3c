// Identifiers and MQTT topics of the v1 contract (docs/contract-v1.md, section 1).

/** Site, station and sensor ids: a letter or digit, then up to 63 of [A-Za-z0-9_.-]. */
export const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/;

export const DEFAULT_TOPIC_PREFIX = 'reef';

/** The message kinds of contract v1. */
export const KINDS = ['ctd', 'oxygen', 'pco2', 'pressure', 'adcp', 'par', 'met', 'sample'] as const;
export type Kind = (typeof KINDS)[number];

export function isKind(value: string): value is Kind {
  return (KINDS as readonly string[]).includes(value);
}

export interface TopicParts {
  site: string;
  station: string;
  kind: string;
  sensor: string;
}

export type TopicParse = { ok: true; parts: TopicParts } | { ok: false; reason: string };

/**
 * Splits `<prefix>/<site>/<station>/<kind>/<sensor>`. The prefix may itself contain slashes.
 * The kind is returned as given; whether it is a known kind is the message parser's concern.
 */
export function parseTopic(topic: string, prefix: string = DEFAULT_TOPIC_PREFIX): TopicParse {
  if (topic.length > 512) return { ok: false, reason: 'bad_topic:too_long' };
  const head = prefix + '/';
  if (!topic.startsWith(head)) return { ok: false, reason: 'bad_topic:prefix' };
  const rest = topic.slice(head.length).split('/');
  if (rest.length !== 4) return { ok: false, reason: 'bad_topic:levels' };
  const [site, station, kind, sensor] = rest as [string, string, string, string];
  for (const [name, value] of [
    ['site', site],
    ['station', station],
    ['sensor', sensor],
  ] as const) {
    if (!ID_PATTERN.test(value)) return { ok: false, reason: `bad_topic:${name}` };
  }
  if (!/^[a-z0-9_]{1,32}$/.test(kind)) return { ok: false, reason: 'bad_topic:kind' };
  return { ok: true, parts: { site, station, kind, sensor } };
}

export function formatTopic(prefix: string, parts: TopicParts): string {
  return `${prefix}/${parts.site}/${parts.station}/${parts.kind}/${parts.sensor}`;
}

/** The Kafka record key of contract section 1. */
export function kafkaKey(parts: Pick<TopicParts, 'site' | 'station' | 'sensor'>): string {
  return `${parts.site}/${parts.station}/${parts.sensor}`;
}
