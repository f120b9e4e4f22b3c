// Reads the deployment's own files named by the configuration (docs/contract-v1.md 3.3, 3.4): the calibration
// file and the field logbook, each a path relative to the configuration file. They are checked against the
// configuration and handed to the processor as its options (libs do no I/O). The daemon reads them at
// start-up; `reefd replay` and `reefd calibrate` at their start.
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import {
  compileCalibration,
  formatCalibrationProblem,
  parseCalibrationText,
  type CalibrationEntry,
} from '../../libs/calibration/index.js';
import { ReefdError, type ReefdConfig } from '../../libs/contract/index.js';
import { parseLogbookText, type LogbookEntry } from '../../libs/logbook/index.js';
import type { ProcessorOptions } from '../../libs/processor/index.js';

export type FieldFileCode = 'REEFD_CALIBRATION_INVALID' | 'REEFD_LOGBOOK_INVALID' | 'REEFD_INPUT_MISSING';

/** A calibration or logbook file that is missing or has problems; `problems` holds one line per problem. */
export class FieldFileError extends ReefdError<FieldFileCode> {
  readonly file: string;
  readonly problems: readonly string[];

  constructor(code: FieldFileCode, file: string, problems: readonly string[]) {
    super(
      code,
      code === 'REEFD_INPUT_MISSING'
        ? `${file} does not exist (${problems.join('; ')})`
        : `${file} has ${problems.length} problem(s): ${problems.join('; ')}`,
      { detail: { file, problems } },
    );
    this.name = 'FieldFileError';
    this.file = file;
    this.problems = problems;
  }
}

export interface FieldFiles {
  /** What the processor takes (createProcessor's options). */
  options: ProcessorOptions;
  calibrationFile?: string;
  calibration: CalibrationEntry[];
  logbookFile?: string;
  logbook: LogbookEntry[];
}

async function text(file: string, key: string): Promise<string> {
  try {
    return await readFile(file, 'utf8');
  } catch (err) {
    const why = (err as NodeJS.ErrnoException).code === 'ENOENT' ? `named by ${key}` : (err as Error).message;
    throw new FieldFileError('REEFD_INPUT_MISSING', file, [why]);
  }
}

/**
 * Reads and checks `calibration_file` and `logbook_file` of a configuration whose file is in `baseDir`.
 * Throws FieldFileError (with every problem and its line) for a missing or invalid file.
 */
export async function loadFieldFiles(baseDir: string, config: ReefdConfig): Promise<FieldFiles> {
  const out: FieldFiles = { options: {}, calibration: [], logbook: [] };
  if (config.calibration_file !== undefined) {
    const file = path.resolve(baseDir, config.calibration_file);
    const r = parseCalibrationText(await text(file, 'calibration_file'), config);
    if (!r.ok) throw new FieldFileError(r.code, file, r.problems.map(formatCalibrationProblem));
    out.calibrationFile = file;
    out.calibration = r.entries;
  }
  if (config.logbook_file !== undefined) {
    const file = path.resolve(baseDir, config.logbook_file);
    const r = parseLogbookText(await text(file, 'logbook_file'), config);
    if (!r.ok)
      throw new FieldFileError(
        r.code,
        file,
        r.problems.map((p) => `${p.path}: ${p.message}${p.line !== undefined ? ` (line ${p.line})` : ''}`),
      );
    out.logbookFile = file;
    out.logbook = r.entries;
  }
  out.options = { calibration: compileCalibration(out.calibration), logbook: out.logbook };
  return out;
}

/** One line for a command's summary: what the files bring. */
export function describeFieldFiles(f: FieldFiles): string | undefined {
  const parts: string[] = [];
  if (f.calibrationFile !== undefined)
    parts.push(`${f.calibration.length} correction(s) from ${path.basename(f.calibrationFile)}`);
  if (f.logbookFile !== undefined) {
    const ex = f.logbook.filter((e) => e.exclude_from !== undefined).length;
    parts.push(
      `${f.logbook.length} logbook entr${f.logbook.length === 1 ? 'y' : 'ies'} (${ex} exclusion(s))`,
    );
  }
  return parts.length === 0 ? undefined : parts.join(', ');
}
