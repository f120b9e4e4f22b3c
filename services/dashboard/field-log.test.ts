import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { demoSiteConfig } from './demo-records.js';
import { entriesFor, fieldLogSource } from './field-log.js';

describe('field log and calibration file on the dashboard', () => {
  it('shows the entries the processor applies, per sensor, and re-reads a changed file', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-fieldlog-'));
    const config = { ...demoSiteConfig(), calibration_file: 'cal.yaml', logbook_file: 'log.yaml' };
    await writeFile(
      path.join(dir, 'cal.yaml'),
      '- { sensor: back/co2-back, field: pco2_uatm, offset: -12.0 }\n',
    );
    await writeFile(
      path.join(dir, 'log.yaml'),
      [
        '- { t: 2026-03-01T02:00:00Z, station: back, event: cleaning, text: all heads wiped }',
        '- { t: 2026-03-01T01:00:00Z, station: back, sensor: o2-back, event: swap, exclude_from: 2026-03-01T00:50:00Z, exclude_to: 2026-03-01T01:10:00Z }',
      ].join('\n'),
    );
    const src = fieldLogSource({ baseDir: dir, config });
    const log = await src.get();
    expect(log.problems).toEqual([]);
    expect(log.calibrations).toEqual([
      {
        sensor: 'back/co2-back',
        field: 'pco2_uatm',
        from: null,
        to: null,
        slope: 1,
        offset: -12,
        drift_per_day: 0,
        slope_drift_per_day: 0,
      },
    ]);
    expect(log.logbook.map((e) => e.event)).toEqual(['swap', 'cleaning']); // in time order
    expect(entriesFor(log, 'back', 'o2-back').logbook.map((e) => e.event)).toEqual(['swap', 'cleaning']);
    expect(entriesFor(log, 'back', 'ctd-back').logbook.map((e) => e.event)).toEqual(['cleaning']);
    expect(entriesFor(log, 'back', 'co2-back').calibrations).toHaveLength(1);
    // A sensor the site does not have: the file is refused as the processor refuses it, and says why.
    await writeFile(
      path.join(dir, 'cal.yaml'),
      '- { sensor: back/co2-nowhere, field: pco2_uatm, offset: 1 }\n# changed\n',
    );
    const bad = await src.get();
    expect(bad.calibrations).toEqual([]);
    expect(bad.problems).toHaveLength(1);
    expect(bad.problems[0]).toMatch(/^calibration_file cal\.yaml line 1: 0\.sensor .*co2-nowhere/);
  });
});
