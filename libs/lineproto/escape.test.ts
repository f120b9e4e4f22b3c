import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { escapeKey, escapeMeasurement, quoteFieldString } from './escape.js';

// A reader of the v2 rules (line protocol reference: `\` escapes the next special character, `\\` is one
// backslash), splitting a `key=value` tag at its first unescaped '=' and stopping at an unescaped ',' or ' '.
function readTag(text: string): { key: string; value: string; rest: string } {
  let key = '';
  let value = '';
  let inValue = false;
  let i = 0;
  for (; i < text.length; i++) {
    let c = text[i] as string;
    if (c === '\\' && i + 1 < text.length) c = text[++i] as string;
    else if (c === '=' && !inValue) {
      inValue = true;
      continue;
    } else if (c === ',' || c === ' ') break;
    if (inValue) value += c;
    else key += c;
  }
  return { key, value, rest: text.slice(i) };
}

describe('line protocol escaping', () => {
  it('escapes commas, equals signs and spaces in tags (line protocol reference)', () => {
    expect(escapeKey('a,b=c d', 'v2')).toBe('a\\,b\\=c\\ d');
    expect(escapeKey('a,b=c d', 'v1')).toBe('a\\,b\\=c\\ d');
  });

  it('escapes only commas and spaces in a measurement (line protocol reference)', () => {
    expect(escapeMeasurement('my meas,x=1', 'v2')).toBe('my\\ meas\\,x=1');
  });

  it('doubles backslashes for v2 and maps them to / for v1 (measured: InfluxDB 1.6.7 keeps \\\\ literally)', () => {
    expect(escapeKey('end\\', 'v2')).toBe('end\\\\');
    expect(escapeKey('end\\', 'v1')).toBe('end/');
  });

  it('turns newlines and other control characters in tags into escaped spaces', () => {
    expect(escapeKey('a\nb\r\tc', 'v2')).toBe('a\\ b\\ \\ c');
  });

  it('quotes string fields, escaping double quotes and backslashes (line protocol reference)', () => {
    expect(quoteFieldString('say "hi" \\o/')).toBe('"say \\"hi\\" \\\\o/"');
    expect(quoteFieldString('two\nlines')).toBe('"two lines"');
  });

  it('round-trips any tag key and value through a v2 reader (property)', () => {
    fc.assert(
      fc.property(fc.string({ minLength: 1 }), fc.string({ minLength: 1 }), (k, v) => {
        // eslint-disable-next-line no-control-regex
        const ctl = (s: string): string => s.replace(/[\u0000-\u001f\u007f]/g, ' ');
        const encoded = escapeKey(k, 'v2') + '=' + escapeKey(v, 'v2') + ',next=1';
        const got = readTag(encoded);
        expect(got.key).toBe(ctl(k));
        expect(got.value).toBe(ctl(v));
        expect(got.rest).toBe(',next=1');
      }),
      { numRuns: 500 },
    );
  });

  it('never lets a v1 tag end in a backslash that would escape the separator (property)', () => {
    fc.assert(
      fc.property(fc.string(), (v) => {
        const out = escapeKey(v, 'v1');
        // Every backslash left in the output is one we added, directly before a special character.
        expect(/\\(?![,= ])/.test(out)).toBe(false);
      }),
      { numRuns: 500 },
    );
  });
});
