// The error catalogue, DEVELOPERS.md and the retry rule stay in sync (DEVELOPERS.md, conventions).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ERROR_CATALOGUE, isRetriable, ReefdError } from './index.js';

const developers = readFileSync(new URL('../../DEVELOPERS.md', import.meta.url), 'utf8');

describe('error catalogue', () => {
  it('lists every code in DEVELOPERS.md, and nothing more', () => {
    const documented = [...developers.matchAll(/^\| `(REEFD_[A-Z_]+)` \|/gm)].map((m) => m[1]);
    expect(documented.sort()).toEqual(Object.keys(ERROR_CATALOGUE).sort());
  });

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
