// A small RFC 4180 CSV reader for lab result sheets: quoted fields with doubled quotes and line breaks,
// CRLF or LF, a UTF-8 byte-order mark (spreadsheets write one), blank lines skipped. Rows keep the sheet's
// row number (the header is row 1), which is what a person sees in a spreadsheet.

export interface CsvRow {
  /** Spreadsheet row number of the row's first line (header = 1). */
  row: number;
  cells: string[];
}

export type CsvParse =
  { ok: true; header: string[]; rows: CsvRow[] } | { ok: false; row: number; reason: string };

export function parseCsv(text: string): CsvParse {
  const s = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const records: CsvRow[] = [];
  let row = 1;
  let i = 0;
  const n = s.length;
  while (i < n) {
    const start = row;
    const cells: string[] = [];
    let cell = '';
    for (;;) {
      if (s[i] === '"') {
        i++;
        for (;;) {
          if (i >= n) return { ok: false, row: start, reason: 'a quoted field is not closed' };
          const c = s[i] as string;
          if (c === '"') {
            if (s[i + 1] === '"') {
              cell += '"';
              i += 2;
              continue;
            }
            i++;
            break;
          }
          if (c === '\n') row++;
          cell += c;
          i++;
        }
        if (i < n && s[i] !== ',' && s[i] !== '\n' && s[i] !== '\r')
          return {
            ok: false,
            row,
            reason: 'text after a closing quote; double a quote inside a quoted field ("")',
          };
      } else {
        while (i < n && s[i] !== ',' && s[i] !== '\n' && s[i] !== '\r') cell += s[i++];
      }
      cells.push(cell);
      cell = '';
      if (s[i] === ',') {
        i++;
        continue;
      }
      if (s[i] === '\r') i++;
      if (s[i] === '\n') i++;
      row++;
      break;
    }
    if (!(cells.length === 1 && (cells[0] as string).trim() === '')) records.push({ row: start, cells });
  }
  const [head, ...rows] = records;
  if (head === undefined)
    return { ok: false, row: 1, reason: 'the file is empty; the first row must name the columns' };
  return { ok: true, header: head.cells.map((c) => c.trim()), rows };
}
