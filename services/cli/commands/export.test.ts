// `reefd export`: exit codes and messages, CSV per record type with the latest revision once, NetCDF files
// read back by our own reader (the outside readers are in test/reference/netcdf.test.ts).
import { mkdtemp, readFile, readdir, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { charStrings, decodeNetcdf } from '../../../libs/netcdf/index.js';
import { captureIo } from '../testing.js';
import { run } from './export.js';

const CONFIG = path.resolve('deploy/demo/ornen-reef.yaml');
let dir: string;
let records: string;

const oxygen = (t: string, o2: number, extra: Record<string, unknown> = {}) => ({
  type: 'oxygen',
  site: 'ornen-reef',
  t,
  station: 'back',
  sensor: 'o2-back',
  o2_umol_kg: o2,
  o2_sat_pct: 95,
  o2_mg_l: 6.5,
  flag: 1,
  ...extra,
});
const flux = (t: string, ncp: number | null, extra: Record<string, unknown> = {}) => ({
  type: 'flux',
  site: 'ornen-reef',
  t,
  transect: 'inner',
  ncp_mmol_m2_h: ncp,
  nec_mmol_m2_h: null,
  nec_method: 'ta',
  u_m_s: 0.1,
  depth_m: 1.5,
  residence_min: 28,
  valid: true,
  ncp_significant: true,
  nec_significant: false,
  flag: 1,
  ...extra,
});

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-export-'));
  records = path.join(dir, 'records.ndjson');
  const lines = [
    oxygen('2026-07-14T00:00:00Z', 200),
    oxygen('2026-07-14T00:05:00Z', 201, { note: 'a, "quoted" note' }),
    flux('2026-07-14T00:15:00Z', 10),
    flux('2026-07-14T00:25:00Z', null, {
      valid: false,
      invalid_reasons: 'input_fault:back/co2/flatline',
      flag: 4,
    }),
    flux('2026-07-14T00:15:00Z', 11, { revision: 1 }), // replaces the first flux window
    oxygen('2026-07-14T00:00:00Z', 200), // an output's repeated delivery
    {
      type: 'alert',
      site: 'ornen-reef',
      t: '2026-07-14T00:05:00Z',
      station: 'back',
      rule: 'stale',
      class: 'fault',
      state: 'raised',
      value: null,
      limit: null,
    },
  ].map((r) => JSON.stringify(r));
  lines.splice(3, 0, '{"type":"nonsense"}', 'not json');
  await writeFile(records, `${lines.join('\n')}\n`);
});

describe('reefd export --format csv', () => {
  it('writes one file per type, the latest revision once, quoting as RFC 4180, and a column dictionary', async () => {
    const io = captureIo();
    const out = path.join(dir, 'csv');
    expect(await run(['--records', records, '--format', 'csv', '--out', out], io)).toBe(0);
    const { stderr } = io.text();
    expect(stderr).toContain('2 line(s) of');
    expect(stderr).toContain('(lines 4, 5)');
    expect(stderr).toContain('export: 5 records (2 earlier revisions or copies left out) -> 4 CSV file(s)');
    expect((await readdir(out)).sort()).toEqual(['alert.csv', 'columns.csv', 'flux.csv', 'oxygen.csv']);
    const ox = (await readFile(path.join(out, 'oxygen.csv'), 'utf8')).trim().split('\n');
    expect(ox[0]).toBe('t,site,station,sensor,o2_umol_kg,o2_sat_pct,o2_mg_l,flag,note');
    expect(ox.slice(1)).toEqual([
      '2026-07-14T00:05:00Z,ornen-reef,back,o2-back,201,95,6.5,1,"a, ""quoted"" note"',
      '2026-07-14T00:00:00Z,ornen-reef,back,o2-back,200,95,6.5,1,',
    ]);
    const fl = (await readFile(path.join(out, 'flux.csv'), 'utf8')).trim().split('\n');
    expect(fl).toHaveLength(3);
    // (ncp and nec sigma, the inverse's NEC in a TA window and the window's PAR are empty here)
    expect(fl[0]?.split(',').slice(15, 18)).toEqual(['invalid_reasons', 'par_umol_m2_s', 'flag']);
    expect(fl[1]).toMatch(
      /^2026-07-14T00:25:00Z,ornen-reef,inner,,,ta,0.1,1.5,28,false,true,false,,,,input_fault:back\/co2\/flatline,,4,/,
    );
    expect(fl[2]).toMatch(/^2026-07-14T00:15:00Z,ornen-reef,inner,11,/);
    expect(fl[2]).toMatch(/,1$/); // revision column
    const dict = await readFile(path.join(out, 'columns.csv'), 'utf8');
    expect(dict).toContain(
      'oxygen,o2_umol_kg,umol kg-1,dissolved oxygen,moles_of_oxygen_per_unit_mass_in_sea_water',
    );
    expect(dict).toContain('flux,t,ISO 8601 UTC,,');
  });
});

describe('reefd export --format netcdf', () => {
  it('writes one file per station and transect that our reader reads back, with CF attributes', async () => {
    const io = captureIo({ SOURCE_DATE_EPOCH: '1785000000' });
    const out = path.join(dir, 'nc');
    expect(
      await run(['--records', records, '--format', 'netcdf', '--out', out, '--config', CONFIG], io),
    ).toBe(0);
    expect((await readdir(out)).sort()).toEqual([
      'ornen-reef_station_back.nc',
      'ornen-reef_transect_inner.nc',
    ]);
    const ds = decodeNetcdf(new Uint8Array(await readFile(path.join(out, 'ornen-reef_transect_inner.nc'))));
    const attr = (name: string) => ds.attributes.find((a) => a.name === name)?.value;
    expect(attr('Conventions')).toBe('CF-1.8, ACDD-1.3');
    expect(attr('featureType')).toBe('timeSeries');
    expect(attr('date_created')).toBe('2026-07-25T17:20:00Z');
    expect(attr('time_coverage_start')).toBe('2026-07-14T00:15:00Z');
    const varOf = (n: string) => ds.variables.find((x) => x.name === n)!;
    expect(Array.from(varOf('time').data)).toEqual([
      Date.parse('2026-07-14T00:15:00Z') / 1000,
      Date.parse('2026-07-14T00:25:00Z') / 1000,
    ]);
    expect(Array.from(varOf('ncp_mmol_m2_h').data)).toEqual([11, 9.969209968386869e36]);
    expect(Array.from(varOf('valid').data)).toEqual([1, 0]);
    expect(Array.from(varOf('flux_qc').data)).toEqual([1, 4]);
    expect(
      charStrings(
        varOf('invalid_reasons').data,
        ds.dimensions.find((d) => d.name === varOf('invalid_reasons').dims[1])!.length,
      ),
    ).toEqual(['', 'input_fault:back/co2/flatline']);
    const ncp = varOf('ncp_mmol_m2_h').attributes;
    expect(ncp.find((a) => a.name === 'ancillary_variables')?.value).toBe('flux_qc');
    expect(ncp.find((a) => a.name === 'units')?.value).toBe('mmol m-2 h-1');
    expect(ncp.find((a) => a.name === 'coordinates')?.value).toBe('time lat lon station_name');
    const lat = varOf('lat').data[0]!;
    expect(lat).toBeCloseTo(8.01, 6); // midpoint of flat and back
  });

  it('takes ACDD attributes from --meta', async () => {
    const meta = path.join(dir, 'meta.yaml');
    await writeFile(meta, 'creator_name: Ornen field team\nlicense: CC-BY-4.0\n');
    const out = path.join(dir, 'nc-meta');
    const io = captureIo();
    expect(
      await run(['--records', records, '--format', 'netcdf', '--out', out, '--meta', meta, '--quiet'], io),
    ).toBe(0);
    expect(io.text().stderr).toMatch(
      /no position for station back, transect inner: lat and lon are left out/,
    );
    const ds = decodeNetcdf(new Uint8Array(await readFile(path.join(out, 'ornen-reef_station_back.nc'))));
    expect(ds.attributes.find((a) => a.name === 'creator_name')?.value).toBe('Ornen field team');
    expect(ds.attributes.find((a) => a.name === 'license')?.value).toBe('CC-BY-4.0');
    // without --config there is no position: no lat/lon variables, and the coordinates say so
    expect(ds.variables.some((x) => x.name === 'lat')).toBe(false);
  });
});

describe('reefd export usage', () => {
  it('exits 2 with the reason', async () => {
    const cases: [string[], RegExp][] = [
      [['--records', records, '--format', 'csv'], /--records, --format and --out are required/],
      [
        ['--records', records, '--format', 'xlsx', '--out', dir],
        /--format must be csv or netcdf \(got "xlsx"\)/,
      ],
      [
        ['--records', path.join(dir, 'nope.ndjson'), '--format', 'csv', '--out', dir],
        /records file .*nope\.ndjson does not exist/,
      ],
    ];
    for (const [argv, msg] of cases) {
      const io = captureIo();
      expect(await run(argv, io)).toBe(2);
      expect(io.text().stderr).toMatch(msg);
    }
    const empty = path.join(dir, 'empty.ndjson');
    await writeFile(empty, '\n');
    const io = captureIo();
    expect(await run(['--records', empty, '--format', 'csv', '--out', path.join(dir, 'x')], io)).toBe(2);
    expect(io.text().stderr).toMatch(/holds no derived records; nothing to export/);
  });
});
