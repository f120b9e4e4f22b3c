// What `reefd calibrate` prints of each fit: the parameters with their standard errors, or the reason the fit
// was refused, then every bottle with its residual and weight.
import type { FitResult } from '../../../libs/calibration/index.js';
import type { Job } from './calibrate-pairs.js';

const f = (x: number, dp: number) => (Number.isFinite(x) ? x.toFixed(dp) : String(x));
/** A time as ISO 8601 UTC, without milliseconds when they are zero. */
export const iso = (ms: number) => new Date(ms).toISOString().replace('.000Z', 'Z');

export function describeFit(j: Job, r: FitResult, windowMin: number): string[] {
  const unit = j.kind === 'pco2' ? 'uatm' : 'umol/kg';
  const lines: string[] = [];
  const head =
    `${j.sensor} ${j.field}: ${r.rows.length} bottle(s) within ${windowMin} min` +
    (j.unpaired > 0 ? ` (${j.unpaired} more without a reading or a carbonate solution)` : '');
  if (r.ok) {
    const ps = r.params
      .map((p) => {
        const u =
          p.name === 'offset'
            ? ` ${unit}`
            : p.name === 'drift_per_day'
              ? ` ${unit}/d`
              : p.name === 'slope_drift_per_day'
                ? ' /d'
                : '';
        return `${p.name} ${p.value.toPrecision(6)} +- ${p.se.toPrecision(2)}${u}`;
      })
      .join(', ');
    const dropped = r.driftDropped
      ? `; drift ${r.driftDropped.value.toPrecision(2)} +- ${r.driftDropped.se.toPrecision(2)}${j.kind === 'pco2' ? ` ${unit}` : ''}/d ` +
        `is within 2 SE of zero: fitted constant`
      : '';
    lines.push(`${head}: ${ps}; scatter ${f(r.scale, 2)} ${unit}, ${r.outliers} outlier(s)${dropped}`);
  } else lines.push(`${head}: REFUSED (${r.code}): ${r.reason}`);
  if (r.rows.length > 0) {
    lines.push(
      `  ${'bottle time'.padEnd(21)} ${'days'.padStart(6)} ${'reference'.padStart(10)} ${'raw'.padStart(9)} ${'corrected'.padStart(10)} ${'residual'.padStart(9)} weight`,
    );
    for (const row of r.rows) {
      lines.push(
        `  ${iso(row.tMs).padEnd(21)} ${f(row.days, 2).padStart(6)} ${f(row.reference, 2).padStart(10)} ${f(row.raw, 2).padStart(9)} ` +
          `${f(row.corrected, 2).padStart(10)} ${f(row.residual, 2).padStart(9)} ${f(row.weight, 2).padStart(6)}${row.weight === 0 ? '  outlier' : ''}`,
      );
    }
  }
  return lines;
}
