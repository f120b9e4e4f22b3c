// A shore member reads each site's calibration file and field log beside its configuration file.
import { mkdir, mkdtemp, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { LATE_CONFIG } from '../../test/unit/inner-transect-config.js';
import { loadShoreSites } from './shore-sites.js';

async function siteDir(): Promise<string> {
  const dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-shore-'));
  await mkdir(path.join(dir, 'site'));
  await writeFile(
    path.join(dir, 'site', 'site.yaml'),
    LATE_CONFIG + 'calibration_file: cal.yaml\nlogbook_file: log.yaml\n',
  );
  await writeFile(
    path.join(dir, 'site', 'cal.yaml'),
    '- { sensor: back/co2-back, field: pco2_uatm, offset: -12 }\n',
  );
  await writeFile(
    path.join(dir, 'site', 'log.yaml'),
    '- { t: 2026-07-14T10:00:00Z, station: back, event: cleaning, exclude_from: 2026-07-14T10:00:00Z, exclude_to: 2026-07-14T10:30:00Z }\n',
  );
  return dir;
}

describe('loadShoreSites', () => {
  it('gives each site the processor options of its own calibration file and field log', async () => {
    const dir = await siteDir();
    // Relative to the configuration file, not the working directory.
    const { sites, processorOptions } = await loadShoreSites([path.join(dir, 'site', 'site.yaml')]);
    const site = sites[0]?.site as string;
    expect(sites).toHaveLength(1);
    const o = processorOptions.get(site);
    expect(o?.calibration?.bySensor.get('back/co2-back')?.[0]?.offset).toBe(-12);
    expect(o?.logbook?.map((e) => e.event)).toEqual(['cleaning']);
  });

  it('refuses the same site given twice', async () => {
    const dir = await siteDir();
    const f = path.join(dir, 'site', 'site.yaml');
    await expect(loadShoreSites([f, f])).rejects.toThrow(/already given by another --site file/);
  });
});
