// The site's calibration file and field log (configuration `calibration_file`, `logbook_file`; see
// docs/contract-v1.md) as the dashboard shows them: per sensor on the sensor view, as markers on the plots.
// Read with the same parsers the processor uses (libs/calibration, libs/logbook), so the page shows exactly
// what is applied; a file that does not parse is shown as its problems. Re-read when a file changes.
import { readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { parseCalibrationText } from '../../libs/calibration/index.js';
import type { ReefdConfig } from '../../libs/contract/index.js';
import { parseLogbookText } from '../../libs/logbook/index.js';
import type { CalibrationEntry, FieldLog, LogbookEntry } from './api-schemas.js';

const iso = (s: string | undefined): string | null =>
  s === undefined ? null : new Date(Date.parse(s)).toISOString();

export interface FieldLogSource {
  get(): Promise<FieldLog>;
}

type Problem = { path: string; message: string; line?: number };
const describe = (what: string, file: string, p: Problem): string =>
  `${what} ${path.basename(file)}${p.line !== undefined ? ` line ${p.line}` : ''}: ${p.path} ${p.message}`;

async function readText(file: string, what: string, problems: string[]): Promise<string | undefined> {
  try {
    return await readFile(file, 'utf8');
  } catch (err) {
    problems.push(`${what} ${file}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
    return undefined;
  }
}

async function calibrations(
  file: string,
  config: ReefdConfig,
  problems: string[],
): Promise<CalibrationEntry[]> {
  const text = await readText(file, 'calibration_file', problems);
  if (text === undefined) return [];
  const r = parseCalibrationText(text, config);
  if (!r.ok) {
    problems.push(...r.problems.map((p) => describe('calibration_file', file, p)));
    return [];
  }
  return r.entries.map((e) => ({
    sensor: e.sensor,
    field: e.field,
    from: iso(e.from),
    to: iso(e.to),
    slope: e.slope,
    offset: e.offset,
    drift_per_day: e.drift_per_day,
    slope_drift_per_day: e.slope_drift_per_day,
  }));
}

async function logbook(file: string, config: ReefdConfig, problems: string[]): Promise<LogbookEntry[]> {
  const text = await readText(file, 'logbook_file', problems);
  if (text === undefined) return [];
  const r = parseLogbookText(text, config);
  if (!r.ok) {
    problems.push(...r.problems.map((p) => describe('logbook_file', file, p)));
    return [];
  }
  return r.entries
    .map((e) => ({
      t: iso(e.t) as string,
      station: e.station,
      sensor: e.sensor ?? null,
      event: e.event,
      text: e.text ?? '',
      exclude_from: iso(e.exclude_from),
      exclude_to: iso(e.exclude_to),
    }))
    .sort((a, b) => (a.t < b.t ? -1 : a.t > b.t ? 1 : 0));
}

/** The calibration and field-log files of a configuration (paths relative to `baseDir`). */
export function fieldLogSource(o: { baseDir: string; config: ReefdConfig }): FieldLogSource {
  const calFile = o.config.calibration_file ? path.resolve(o.baseDir, o.config.calibration_file) : undefined;
  const logFile = o.config.logbook_file ? path.resolve(o.baseDir, o.config.logbook_file) : undefined;
  let cached: { key: string; value: FieldLog } | undefined;
  const mtime = async (f: string | undefined) => {
    if (f === undefined) return 'none';
    try {
      const s = await stat(f);
      return `${s.mtimeMs}:${s.size}`;
    } catch {
      return 'missing';
    }
  };
  return {
    async get() {
      const key = `${await mtime(calFile)}|${await mtime(logFile)}`;
      if (cached?.key === key) return cached.value;
      const problems: string[] = [];
      const value: FieldLog = {
        calibrations: calFile ? await calibrations(calFile, o.config, problems) : [],
        logbook: logFile ? await logbook(logFile, o.config, problems) : [],
        problems,
      };
      cached = { key, value };
      return value;
    },
  };
}

/** The entries that concern one sensor: its calibrations, and log entries of the sensor or its whole station. */
export function entriesFor(
  log: FieldLog,
  station: string,
  sensor: string,
): { calibrations: CalibrationEntry[]; logbook: LogbookEntry[] } {
  return {
    calibrations: log.calibrations.filter((c) => c.sensor === `${station}/${sensor}`),
    logbook: log.logbook.filter((e) => e.station === station && (e.sensor === null || e.sensor === sensor)),
  };
}
