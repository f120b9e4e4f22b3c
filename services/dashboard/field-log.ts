// The site's calibration file and field log (configuration `calibration_file`, `logbook_file`; see
// docs/contract-v1.md) as the dashboard shows them: per sensor on the sensor view, as markers on the plots.
// Read leniently (an entry the dashboard cannot use is listed under `problems`, the rest still shows): the
// processor's own loader is the one that refuses a bad file. Re-read when a file's modification time changes.
import { stat, readFile } from 'node:fs/promises';
import path from 'node:path';
import { parse } from 'yaml';
import type { CalibrationEntry, FieldLog, LogbookEntry } from './api-schemas.js';

const MAX_ENTRIES = 5000;

const isoOf = (v: unknown): string | null => {
  if (v instanceof Date) return Number.isFinite(v.getTime()) ? v.toISOString() : null;
  if (typeof v !== 'string') return null;
  const ms = Date.parse(v);
  return Number.isFinite(ms) ? new Date(ms).toISOString() : null;
};
const numOr = (v: unknown, d: number): number => (typeof v === 'number' && Number.isFinite(v) ? v : d);

function calibrations(list: unknown[], problems: string[]): CalibrationEntry[] {
  const out: CalibrationEntry[] = [];
  list.slice(0, MAX_ENTRIES).forEach((x, i) => {
    const e = (x ?? {}) as Record<string, unknown>;
    if (typeof e.sensor !== 'string' || !e.sensor.includes('/') || typeof e.field !== 'string') {
      problems.push(`calibration entry ${i + 1}: needs sensor (<station>/<sensor>) and field`);
      return;
    }
    out.push({
      sensor: e.sensor,
      field: e.field,
      from: isoOf(e.from),
      to: isoOf(e.to),
      slope: numOr(e.slope, 1),
      offset: numOr(e.offset, 0),
      drift_per_day: numOr(e.drift_per_day, 0),
      slope_drift_per_day: numOr(e.slope_drift_per_day, 0),
    });
  });
  return out;
}

function logbook(list: unknown[], problems: string[]): LogbookEntry[] {
  const out: LogbookEntry[] = [];
  list.slice(0, MAX_ENTRIES).forEach((x, i) => {
    const e = (x ?? {}) as Record<string, unknown>;
    const t = isoOf(e.t);
    if (t === null || typeof e.station !== 'string' || typeof e.event !== 'string') {
      problems.push(`logbook entry ${i + 1}: needs t (ISO time), station and event`);
      return;
    }
    out.push({
      t,
      station: e.station,
      sensor: typeof e.sensor === 'string' ? e.sensor : null,
      event: e.event,
      text: typeof e.text === 'string' ? e.text : '',
      exclude_from: isoOf(e.exclude_from),
      exclude_to: isoOf(e.exclude_to),
    });
  });
  return out.sort((a, b) => (a.t < b.t ? -1 : a.t > b.t ? 1 : 0));
}

async function readList(file: string, what: string, problems: string[]): Promise<unknown[]> {
  try {
    const doc: unknown = parse(await readFile(file, 'utf8'));
    if (doc === null || doc === undefined) return [];
    if (!Array.isArray(doc)) {
      problems.push(`${what} ${file}: expected a YAML list of entries`);
      return [];
    }
    return doc;
  } catch (err) {
    problems.push(`${what} ${file}: ${(err as Error).message.split('\n')[0]}`);
    return [];
  }
}

export interface FieldLogSource {
  get(): Promise<FieldLog>;
}

/** The calibration and field-log files of a configuration (paths relative to `baseDir`). */
export function fieldLogSource(o: {
  baseDir: string;
  calibrationFile?: string | undefined;
  logbookFile?: string | undefined;
}): FieldLogSource {
  const calFile = o.calibrationFile ? path.resolve(o.baseDir, o.calibrationFile) : undefined;
  const logFile = o.logbookFile ? path.resolve(o.baseDir, o.logbookFile) : undefined;
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
        calibrations: calFile
          ? calibrations(await readList(calFile, 'calibration_file', problems), problems)
          : [],
        logbook: logFile ? logbook(await readList(logFile, 'logbook_file', problems), problems) : [],
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
