// Kafka messages in the MQTT shape (contract section 1): the value is the JSON payload plus `site`,
// `station`, `kind`, `sensor`; the key is `<site>/<station>/<sensor>`. The topic is rebuilt from those so
// the rest of the pipeline sees one shape. Fields in the value win; the key fills in what the value lacks.
// A part that cannot be found becomes `?`, which the topic parser rejects with its reason (the message then
// goes to the dead-letter output and the archive like any other bad message).
import { formatTopic } from '../../libs/contract/index.js';

export function kafkaTopicOf(prefix: string, key: Buffer | null, value: Buffer | null): string {
  const fromKey = (key?.toString('utf8') ?? '').split('/');
  let obj: Record<string, unknown> = {};
  try {
    const parsed: unknown = JSON.parse(value?.toString('utf8') ?? '');
    if (parsed !== null && typeof parsed === 'object' && !Array.isArray(parsed))
      obj = parsed as Record<string, unknown>;
  } catch {
    // not JSON: the parser rejects the payload itself
  }
  const pick = (field: string, keyIndex: number | undefined): string => {
    const v = obj[field];
    if (typeof v === 'string' && v !== '' && !v.includes('/')) return v;
    const k = keyIndex !== undefined && fromKey.length === 3 ? fromKey[keyIndex] : undefined;
    return k !== undefined && k !== '' ? k : '?';
  };
  return formatTopic(prefix, {
    site: pick('site', 0),
    station: pick('station', 1),
    kind: pick('kind', undefined),
    sensor: pick('sensor', 2),
  });
}
