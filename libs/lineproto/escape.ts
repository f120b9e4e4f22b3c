// Line protocol escaping (InfluxData line protocol reference, "Special characters"):
// measurement: comma, space; tag keys, tag values, field keys: comma, equals sign, space;
// string field values: double quote and backslash, inside double quotes.
//
// Two dialects, because the parsers disagree on backslashes (measured on InfluxDB 1.6.7 and
// VictoriaMetrics 1.79): the v2 parsers read `\\` as one backslash; InfluxDB 1.x keeps every backslash
// literally, so a tag value ending in a backslash escapes the following separator and the line is refused.
// In the v1 dialect a backslash in a name or tag is therefore written as '/', which v1 cannot confuse
// (contract ids never hold a backslash; only hostile input does).
// No dialect can carry a newline in a name or tag (a newline ends the line, and VictoriaMetrics splits
// lines before it reads quotes), so CR, LF and other control characters become a space before escaping.

export type Dialect = 'v1' | 'v2';

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001f\u007f]/g;

function clean(s: string, dialect: Dialect): string {
  const noCtl = s.replace(CONTROL, ' ');
  return dialect === 'v1' ? noCtl.replace(/\\/g, '/') : noCtl.replace(/\\/g, '\\\\');
}

/** A measurement name: commas and spaces escaped. */
export function escapeMeasurement(s: string, dialect: Dialect): string {
  return clean(s, dialect).replace(/[, ]/g, (c) => '\\' + c);
}

/** A tag key, tag value or field key: commas, equals signs and spaces escaped. */
export function escapeKey(s: string, dialect: Dialect): string {
  return clean(s, dialect).replace(/[,= ]/g, (c) => '\\' + c);
}

/** A string field value, quotes included: backslashes and double quotes escaped; both dialects agree here. */
export function quoteFieldString(s: string): string {
  return '"' + s.replace(CONTROL, ' ').replace(/[\\"]/g, (c) => '\\' + c) + '"';
}
