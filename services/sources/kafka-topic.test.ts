import { describe, it, expect } from 'vitest';
import { parseTopic } from '../../libs/contract/index.js';
import { kafkaTopicOf } from './kafka-topic.js';

const b = (s: string): Buffer => Buffer.from(s);

describe('kafkaTopicOf (contract section 1)', () => {
  it('rebuilds the MQTT topic from the value fields', () => {
    const t = kafkaTopicOf(
      'reef',
      b('demo-reef/crest/o2'),
      b('{"v":1,"site":"demo-reef","station":"crest","kind":"oxygen","sensor":"o2"}'),
    );
    expect(t).toBe('reef/demo-reef/crest/oxygen/o2');
    expect(parseTopic(t, 'reef')).toEqual({
      ok: true,
      parts: { site: 'demo-reef', station: 'crest', kind: 'oxygen', sensor: 'o2' },
    });
  });

  it('fills site, station and sensor from the key when the value lacks them', () => {
    expect(kafkaTopicOf('x/y', b('s1/st2/p1'), b('{"v":1,"kind":"pressure"}'))).toBe(
      'x/y/s1/st2/pressure/p1',
    );
  });

  it('gives a topic the parser rejects when the kind is missing or the value is not JSON', () => {
    const t1 = kafkaTopicOf('reef', b('s/st/c'), b('{"v":1}'));
    expect(t1).toBe('reef/s/st/?/c');
    expect(parseTopic(t1, 'reef')).toEqual({ ok: false, reason: 'bad_topic:kind' });
    expect(kafkaTopicOf('reef', null, b('not json'))).toBe('reef/?/?/?/?');
  });

  it('never lets a slash in a field add topic levels', () => {
    expect(kafkaTopicOf('reef', b('s/st/c'), b('{"site":"a/b","kind":"ctd"}'))).toBe('reef/s/st/ctd/c');
  });
});
