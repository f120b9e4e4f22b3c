// Writes calibration entries as the YAML of the calibration file, each with its comment lines (what the fit
// was, its standard errors). Pure text; parseCalibrationText reads it back to the same entries.
import type { CalibrationEntry } from './schema.js';

/** Eight significant digits: far below any calibration's uncertainty, and stable in a diff. */
const num = (x: number): string => String(Number(x.toPrecision(8)));
const comment = (line: string): string => `# ${line.replace(/\n/g, ' ')}`;

export function formatCalibrationYaml(
  entries: readonly { entry: CalibrationEntry; comments?: readonly string[] }[],
  header: readonly string[] = [],
): string {
  const out: string[] = header.map(comment);
  if (entries.length === 0) return `${[...out, '[]'].join('\n')}\n`;
  for (const { entry: e, comments } of entries) {
    if (out.length > 0) out.push('');
    for (const c of comments ?? []) out.push(comment(c));
    out.push(`- sensor: ${e.sensor}`, `  field: ${e.field}`);
    if (e.from !== undefined) out.push(`  from: ${e.from}`);
    if (e.to !== undefined) out.push(`  to: ${e.to}`);
    out.push(
      `  slope: ${num(e.slope)}`,
      `  offset: ${num(e.offset)}`,
      `  drift_per_day: ${num(e.drift_per_day)}`,
      `  slope_drift_per_day: ${num(e.slope_drift_per_day)}`,
    );
  }
  return `${out.join('\n')}\n`;
}
