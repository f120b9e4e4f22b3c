// A reference reader of line protocol, written from the InfluxData line protocol reference ("Syntax",
// "Special characters"): `measurement[,tag=value...] field=value[,field=value...] timestamp`, where a
// backslash escapes the next character in names and tag values (v2 parsers also read `\\` as one
// backslash) and string field values are double-quoted with `\"` and `\\` escaped. Used only to check that
// what libs/lineproto writes reads back as meant.
export interface ParsedLine {
  measurement: string;
  tags: Record<string, string>;
  fields: Record<string, number | boolean | string>;
  timeMs: number;
}

export function parseLine(line: string): ParsedLine {
  if (line.includes('\n') || line.includes('\r')) throw new Error('newline inside a line');
  if (line.startsWith('#')) throw new Error('line starts with #: a comment');
  let i = 0;
  const readName = (stops: string): string => {
    let s = '';
    while (i < line.length && !stops.includes(line[i] as string)) {
      if (line[i] === '\\' && i + 1 < line.length) {
        s += line[i + 1];
        i += 2;
      } else s += line[i++];
    }
    return s;
  };
  const measurement = readName(', ');
  if (measurement === '') throw new Error('empty measurement');
  const tags: Record<string, string> = {};
  while (line[i] === ',') {
    i++;
    const k = readName('=, ');
    if (line[i] !== '=') throw new Error(`tag "${k}" without =`);
    i++;
    const v = readName(', ');
    if (k === '' || v === '') throw new Error('empty tag key or value');
    tags[k] = v;
  }
  if (line[i] !== ' ') throw new Error('no space before the fields');
  i++;
  const fields: Record<string, number | boolean | string> = {};
  for (;;) {
    const k = readName('=, ');
    if (k === '') throw new Error('empty field key');
    if (line[i] !== '=') throw new Error(`field "${k}" without =`);
    i++;
    if (line[i] === '"') {
      i++;
      let s = '';
      while (i < line.length && line[i] !== '"') {
        if (line[i] === '\\' && (line[i + 1] === '"' || line[i + 1] === '\\')) {
          s += line[i + 1];
          i += 2;
        } else s += line[i++];
      }
      if (line[i] !== '"') throw new Error('unterminated string');
      i++;
      fields[k] = s;
    } else {
      let raw = '';
      while (i < line.length && line[i] !== ',' && line[i] !== ' ') raw += line[i++];
      if (raw === 'true' || raw === 'false') fields[k] = raw === 'true';
      else if (/^-?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(raw)) fields[k] = Number(raw);
      else throw new Error(`bad field value "${raw}"`);
    }
    if (line[i] === ',') {
      i++;
      continue;
    }
    break;
  }
  if (line[i] !== ' ') throw new Error('no space before the timestamp');
  i++;
  const ts = line.slice(i);
  if (!/^-?\d+$/.test(ts)) throw new Error(`bad timestamp "${ts}"`);
  return { measurement, tags, fields, timeMs: Number(ts) };
}
