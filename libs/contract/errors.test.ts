// The core catalogue, the retry rule and defineErrors (test/unit/error-codes.test.ts checks docs/errors.md).
import { describe, expect, it } from 'vitest';
import {
  defineErrors,
  ERROR_CATALOGUE,
  errorCode,
  isErrorCatalogue,
  isRetriable,
  ReefdError,
} from './index.js';

describe('error catalogue', () => {
  it('gives each code a message that says what to do', () => {
    for (const [code, text] of Object.entries(ERROR_CATALOGUE)) {
      expect(text.length, code).toBeGreaterThan(30);
    }
  });

  it('retries only what is marked retriable, never programming errors', () => {
    expect(isRetriable(new ReefdError('REEFD_SINK_UNAVAILABLE', undefined, { retriable: true }))).toBe(true);
    expect(isRetriable(new ReefdError('REEFD_CONFIG_INVALID'))).toBe(false);
    expect(isRetriable(new TypeError('x is undefined'))).toBe(false);
    expect(isRetriable(new RangeError('bad'))).toBe(false);
    expect(isRetriable(Object.assign(new Error('refused'), { code: 'ECONNREFUSED' }))).toBe(true);
    expect(isRetriable(Object.assign(new Error('denied'), { code: 'EACCES' }))).toBe(false);
  });
});

describe('defineErrors', () => {
  const CAT = defineErrors('libs/example', {
    REEFD_EXAMPLE_BAD: 'the example value is wrong; give a positive one',
    REEFD_EXAMPLE_AWAY: { text: 'the example service is away; it is retried with backoff', retriable: true },
  });

  it('builds errors whose message names the code, the case and the fix', () => {
    const e = CAT.error('REEFD_EXAMPLE_BAD', 'got -3', { detail: { value: -3 } });
    expect(e).toBeInstanceOf(ReefdError);
    expect(e.code).toBe('REEFD_EXAMPLE_BAD');
    expect(e.message).toBe('REEFD_EXAMPLE_BAD: got -3; the example value is wrong; give a positive one');
    expect(e.detail).toEqual({ value: -3 });
    expect(CAT.error('REEFD_EXAMPLE_BAD').message).toBe(
      'REEFD_EXAMPLE_BAD: the example value is wrong; give a positive one',
    );
  });

  it('takes the retriable mark from the catalogue unless the case overrides it', () => {
    expect(CAT.error('REEFD_EXAMPLE_AWAY').retriable).toBe(true);
    expect(CAT.error('REEFD_EXAMPLE_BAD').retriable).toBe(false);
    expect(CAT.error('REEFD_EXAMPLE_AWAY', 'HTTP 400', { retriable: false }).retriable).toBe(false);
    expect(isRetriable(CAT.error('REEFD_EXAMPLE_AWAY'))).toBe(true);
  });

  it('keeps the cause, and tells its own errors from others', () => {
    const cause = new Error('socket closed');
    const e = CAT.error('REEFD_EXAMPLE_AWAY', undefined, { cause });
    expect(e.cause).toBe(cause);
    expect(CAT.is(e)).toBe(true);
    expect(CAT.is(e, 'REEFD_EXAMPLE_BAD')).toBe(false);
    expect(CAT.is(new ReefdError('REEFD_CONFIG_INVALID'))).toBe(false);
    expect(errorCode(e)).toBe('REEFD_EXAMPLE_AWAY');
    expect(errorCode(Object.assign(new Error('full'), { code: 'ENOSPC' }))).toBe('ENOSPC');
    expect(errorCode(new Error('plain'))).toBeUndefined();
  });

  it('refuses a malformed code or a text that does not say how to fix it, at load', () => {
    expect(() => defineErrors('x', { REEFD_lower: 'some long enough text here' })).toThrow(/REEFD_lower/);
    expect(() => defineErrors('x', { OTHER_CODE: 'some long enough text here' })).toThrow(/OTHER_CODE/);
    expect(() => defineErrors('x', { REEFD_X_Y: 'short' })).toThrow(/REEFD_X_Y needs a text/);
  });

  it('is recognised as a catalogue, and plain objects are not', () => {
    expect(isErrorCatalogue(CAT)).toBe(true);
    expect(isErrorCatalogue({ REEFD_EXAMPLE_BAD: 'text' })).toBe(false);
    expect(isErrorCatalogue(null)).toBe(false);
    expect(CAT.codes).toEqual(['REEFD_EXAMPLE_BAD', 'REEFD_EXAMPLE_AWAY']);
  });
});
