// How database answers are classified: outages retried, credentials and missing databases retried with an
// alert (a rotated token must not lose data), refusals of the data dropped.
import { describe, expect, it } from 'vitest';
import { ReefdError } from '../../libs/contract/index.js';
import { checkStatus, mayHaveLanded } from './http.js';
import { isAuthFailure, isRefusal } from './spooled-sink.js';

const answer = (status: number) => ({ status, headers: {}, body: 'why' });
const thrown = (status: number): unknown => {
  try {
    checkStatus(answer(status), 'db');
  } catch (err) {
    return err;
  }
  return undefined;
};

describe('database answers', () => {
  it.each([401, 403, 404])(
    'HTTP %i: credentials or database, spooled and retried with an alert',
    (status) => {
      const err = thrown(status);
      expect(err).toBeInstanceOf(ReefdError);
      expect(err).toMatchObject({ code: 'REEFD_SINK_AUTH', retriable: true });
      expect(isAuthFailure(err)).toBe(true);
      expect(isRefusal(err)).toBe(false);
    },
  );

  it.each([500, 503, 408, 429])('HTTP %i: an outage, retried', (status) => {
    expect(thrown(status)).toMatchObject({ code: 'REEFD_SINK_UNAVAILABLE', retriable: true });
  });

  it.each([400, 413, 422])('HTTP %i: the data is refused, dropped', (status) => {
    const err = thrown(status);
    expect(isRefusal(err)).toBe(true);
    expect(isAuthFailure(err)).toBe(false);
  });

  it('2xx passes', () => {
    expect(thrown(204)).toBeUndefined();
  });

  it('knows which failures may have landed at the database (no answer after sending)', () => {
    expect(mayHaveLanded(Object.assign(new Error('x'), { code: 'ETIMEDOUT' }))).toBe(true);
    expect(mayHaveLanded(Object.assign(new Error('x'), { code: 'ECONNRESET' }))).toBe(true);
    expect(mayHaveLanded(Object.assign(new Error('x'), { code: 'ECONNREFUSED' }))).toBe(false);
    expect(mayHaveLanded(thrown(503))).toBe(false);
  });
});
