import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseCsv } from './csv.js';

describe('parseCsv', () => {
  it('reads quoted fields, doubled quotes, CRLF, a BOM, and keeps spreadsheet row numbers', () => {
    const r = parseCsv(
      '\ufefft,station,note\r\n2026-07-14T08:00:00Z,flat,"a, ""b"""\r\n\r\n2026-07-14T09:00:00Z,back,"two\nlines"\nx,y,z',
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.header).toEqual(['t', 'station', 'note']);
    expect(r.rows).toEqual([
      { row: 2, cells: ['2026-07-14T08:00:00Z', 'flat', 'a, "b"'] },
      { row: 4, cells: ['2026-07-14T09:00:00Z', 'back', 'two\nlines'] },
      { row: 6, cells: ['x', 'y', 'z'] },
    ]);
  });

  it('says where a quote is not closed or text follows it', () => {
    expect(parseCsv('a,b\n1,"open\n')).toEqual({ ok: false, row: 2, reason: 'a quoted field is not closed' });
    const r = parseCsv('a,b\n1,"x"y\n');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.row).toBe(2);
    expect(parseCsv('').ok).toBe(false);
  });

  it('property: any table written with RFC 4180 quoting reads back equal', () => {
    const cell = fc.string({ maxLength: 12 });
    fc.assert(
      fc.property(
        fc
          .integer({ min: 1, max: 5 })
          .chain((w) =>
            fc.array(fc.array(cell, { minLength: w, maxLength: w }), { minLength: 2, maxLength: 8 }),
          ),
        (table) => {
          const rows = table.filter((r) => !(r.length === 1 && r[0]!.trim() === ''));
          fc.pre(rows.length >= 1);
          const text = rows
            .map((r) => r.map((c) => (/[",\r\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c)).join(','))
            .join('\r\n');
          const p = parseCsv(text);
          if (!p.ok) throw new Error(p.reason);
          expect([p.header, ...p.rows.map((x) => x.cells)].map((r, i) => (i === 0 ? r : r))).toEqual([
            rows[0]!.map((c) => c.trim()),
            ...rows.slice(1),
          ]);
        },
      ),
      { numRuns: 300 },
    );
  });
});
