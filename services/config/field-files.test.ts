// The calibration file and the logbook read beside the configuration (docs/contract-v1.md 3.3, 3.4).
import { mkdir, mkdtemp, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../../libs/contract/index.js';
import { LATE_CONFIG } from '../../test/unit/inner-transect-config.js';
import { describeFieldFiles, FieldFileError, loadFieldFiles } from './field-files.js';

function config(extra: string) {
  const r = parseConfigText(LATE_CONFIG + extra);
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.config;
}

describe('loadFieldFiles', () => {
  it('reads both files relative to the configuration, checked, as the processor options', async () => {
    const dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-field-'));
    await mkdir(path.join(dir, 'cal'));
    await writeFile(
      path.join(dir, 'cal', 'cal.yaml'),
      '- { sensor: back/co2-back, field: pco2_uatm, offset: -12 }\n- { sensor: flat/o2-flat, field: o2_umol_l, slope: 1.02 }\n',
    );
    await writeFile(
      path.join(dir, 'log.yaml'),
      '- { t: 2026-07-14T10:00:00Z, station: back, event: cleaning, exclude_from: 2026-07-14T10:00:00Z, exclude_to: 2026-07-14T10:30:00Z }\n- { t: 2026-07-14T12:00:00Z, station: flat, event: note, text: calm }\n',
    );
    const f = await loadFieldFiles(dir, config('calibration_file: cal/cal.yaml\nlogbook_file: log.yaml\n'));
    expect(f.calibration.map((e) => e.offset)).toEqual([-12, 0]);
    expect(f.options.calibration?.size).toBe(2);
    expect(f.options.calibration?.bySensor.get('back/co2-back')?.[0]?.offset).toBe(-12);
    expect(f.options.logbook?.map((e) => e.event)).toEqual(['cleaning', 'note']);
    expect(f.calibrationFile).toBe(path.join(dir, 'cal', 'cal.yaml'));
    expect(describeFieldFiles(f)).toBe('2 correction(s) from cal.yaml, 2 logbook entries (1 exclusion(s))');
  });

  it('gives no options and no summary without the keys', async () => {
    const f = await loadFieldFiles(os.tmpdir(), config(''));
    expect(f.calibration).toEqual([]);
    expect(f.logbook).toEqual([]);
    expect(describeFieldFiles(f)).toBeUndefined();
  });

  it('refuses a missing file and an invalid one, naming each problem with its line', async () => {
    const dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-field-'));
    const missing = await loadFieldFiles(dir, config('calibration_file: nope.yaml\n')).catch(
      (e: unknown) => e,
    );
    expect(missing).toBeInstanceOf(FieldFileError);
    expect((missing as FieldFileError).code).toBe('REEFD_INPUT_MISSING');
    expect((missing as FieldFileError).message).toMatch(
      /nope\.yaml does not exist \(named by calibration_file\)/,
    );
    await writeFile(
      path.join(dir, 'cal.yaml'),
      '- sensor: back/co2-back\n  field: pco2_uatm\n  offset: -12\n- sensor: back/nosuch\n  field: pco2_uatm\n',
    );
    const bad = await loadFieldFiles(dir, config('calibration_file: cal.yaml\n')).catch((e: unknown) => e);
    expect((bad as FieldFileError).code).toBe('REEFD_CALIBRATION_INVALID');
    expect((bad as FieldFileError).problems).toEqual([
      '1.sensor: station "back" has no sensor "nosuch" (line 4)',
    ]);
    await writeFile(
      path.join(dir, 'log.yaml'),
      '- { t: 2026-07-14T10:00:00Z, station: reef9, event: note }\n',
    );
    const log = await loadFieldFiles(dir, config('logbook_file: log.yaml\n')).catch((e: unknown) => e);
    expect((log as FieldFileError).code).toBe('REEFD_LOGBOOK_INVALID');
    expect((log as FieldFileError).problems[0]).toMatch(
      /^0\.station: station "reef9" is not in the configuration/,
    );
  });
});
