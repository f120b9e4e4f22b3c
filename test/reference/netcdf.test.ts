// reefd's NetCDF and CSV exports read back by outside tools: netCDF4-python, xarray and pandas read every
// value at its time, and the IOOS compliance checker (CF 1.8, ACDD 1.3) finds no CF error, from
// test/reference/netcdf/generate.py (committed in test/reference/vectors/netcdf.json; `npm run
// test:reference` regenerates it). This test holds the committed result to the bar and checks that today's
// exporter still writes the files and variables that were checked.
import { readFileSync } from 'node:fs';
import { mkdtemp, readdir } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { decodeNetcdf } from '../../libs/netcdf/index.js';
import { makeExports } from './netcdf/make-exports.js';

interface FileCheck {
  format: string;
  feature_type: string;
  variables: string[];
  values_checked_over_200: boolean;
  every_time_present: boolean;
  mismatch_count: number;
  xarray_time_dtype: string;
  checker: Record<'cf' | 'acdd', { failed: Record<'high' | 'medium' | 'low', number>; exceptions: number }>;
  revised_ncp?: number;
}
const v = JSON.parse(readFileSync(new URL('./vectors/netcdf.json', import.meta.url), 'utf8')) as {
  netcdf: Record<string, FileCheck>;
  csv: Record<string, { has_rows: boolean; first_columns: string[] }>;
  csv_revised_rows: number;
  csv_revised_ncp: number;
  csv_calibrated: Record<string, number>;
};

describe('NetCDF export read back by netCDF4/xarray and the IOOS compliance checker', () => {
  const files = Object.entries(v.netcdf);

  it('covers every station and transect file of the fixture', () => {
    expect(files.map(([f]) => f)).toEqual([
      'ornen-reef_station_back.nc',
      'ornen-reef_station_channel.nc',
      'ornen-reef_station_crest.nc',
      'ornen-reef_station_flat.nc',
      'ornen-reef_station_fore.nc',
      'ornen-reef_station_lagoon.nc',
      'ornen-reef_transect_inner.nc',
      'ornen-reef_transect_outer.nc',
    ]);
  });

  for (const [name, f] of files) {
    it(`${name}: zero CF 1.8 failures at any priority, every value read back equal`, () => {
      expect(f.checker.cf.failed).toEqual({ high: 0, medium: 0, low: 0 });
      expect(f.checker.cf.exceptions).toBe(0);
      expect(f.checker.acdd.exceptions).toBe(0);
      expect(f.format).toBe('NETCDF3_CLASSIC');
      expect(f.feature_type).toBe('timeSeries');
      expect(f.xarray_time_dtype).toMatch(/^datetime64/);
      expect(f.values_checked_over_200).toBe(true);
      expect(f.every_time_present).toBe(true);
      expect(f.mismatch_count).toBe(0);
    });
  }

  it('exports records built from corrected values (the fixture replays with a calibration file), marked in the CSV', () => {
    // back reef pCO2 corrected: its carbonate records; crest optode: its oxygen records; both transects' fluxes
    expect(v.csv_calibrated['carbonate.csv']).toBeGreaterThan(50);
    expect(v.csv_calibrated['oxygen.csv']).toBeGreaterThan(100);
    expect(v.csv_calibrated['flux.csv']).toBeGreaterThan(100);
  });

  it('exports the latest revision of a record, once (NetCDF and CSV)', () => {
    expect(v.netcdf['ornen-reef_transect_outer.nc']?.revised_ncp).toBe(12.345);
    expect(v.csv_revised_rows).toBe(1);
    expect(v.csv_revised_ncp).toBe(12.345);
  });
});

describe("today's exporter writes what was checked", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-nc-now-'));
    await makeExports(dir);
  }, 120_000);

  it('the same NetCDF files with the same variables, and the same CSV columns', async () => {
    const nc = (await readdir(path.join(dir, 'nc'))).sort();
    expect(nc).toEqual(Object.keys(v.netcdf));
    for (const name of nc) {
      const ds = decodeNetcdf(new Uint8Array(readFileSync(path.join(dir, 'nc', name))));
      expect(ds.variables.map((x) => x.name).sort(), name).toEqual(v.netcdf[name]!.variables);
    }
    const csv = (await readdir(path.join(dir, 'csv'))).sort();
    expect(csv).toEqual(Object.keys(v.csv).sort());
  });
});
