// `reefd samples import`: all or nothing, every row checked with its row number, lines appended to the
// archive as sample messages received now, and a second import of the same sheet refused.
import { mkdir, mkdtemp, readFile, readdir, stat, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { beforeEach, describe, expect, it } from 'vitest';
import { readArchive } from '../../archive/index.js';
import { captureIo } from '../testing.js';
import { run } from './samples.js';

const CONFIG = `site: ornen-reef
reef_axis_deg: 270
stations:
  back:
    sensors:
      ctd-back: { kind: ctd }
      o2-back: { kind: oxygen }
      bottle-back: { kind: sample }
`;
let dir: string;
let cfg: string;
let archive: string;
const day = '2026-07-14';

beforeEach(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-samples-'));
  cfg = path.join(dir, 'site.yaml');
  archive = path.join(dir, 'archive');
  await mkdir(archive);
  await writeFile(cfg, CONFIG);
  const lines: string[] = [];
  for (let h = 0; h < 24; h++) {
    const t = `${day}T${String(h).padStart(2, '0')}:00:00Z`;
    lines.push(
      JSON.stringify({
        topic: 'reef/ornen-reef/back/ctd/ctd-back',
        rx: t,
        msg: { v: 1, t, temp_c: 27, sal: 35 },
      }),
    );
  }
  await writeFile(path.join(archive, `raw-${day}.ndjson`), `${lines.join('\n')}\n`);
});

const importCsv = async (csv: string, extra: string[] = []) => {
  const file = path.join(dir, 'lab.csv');
  await writeFile(file, csv);
  const io = captureIo();
  const code = await run(['import', '--config', cfg, '--csv', file, '--archive', archive, ...extra], io);
  return { code, ...io.text() };
};
const snapshot = async () =>
  Object.fromEntries(
    await Promise.all(
      (await readdir(archive)).map(async (f) => [f, (await stat(path.join(archive, f))).size]),
    ),
  );

describe('reefd samples import', () => {
  it('appends every row as a sample message received now, which the archive reader reads back', async () => {
    const before = Date.now();
    const r = await importCsv(
      't,station,sensor,ta_umol_kg,dic_umol_kg,o2_umol_kg\n2026-07-14T06:00:00Z,back,bottle-back,2291.4,1998.2,201.5\n2026-07-14T12:00:00Z,back,bottle-back,2288,1960,\n',
    );
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/imported 2 lab results into/);
    const samples = [];
    for await (const e of readArchive(archive)) if (e.line?.topic.includes('/sample/')) samples.push(e.line);
    expect(samples.map((s) => s.msg)).toEqual([
      { v: 1, t: '2026-07-14T06:00:00Z', ta_umol_kg: 2291.4, dic_umol_kg: 1998.2, o2_umol_kg: 201.5 },
      { v: 1, t: '2026-07-14T12:00:00Z', ta_umol_kg: 2288, dic_umol_kg: 1960 },
    ]);
    expect(samples[0]!.topic).toBe('reef/ornen-reef/back/sample/bottle-back');
    const rx = Date.parse(samples[0]!.rx);
    expect(rx).toBeGreaterThanOrEqual(before - 1);
    expect(rx).toBeLessThanOrEqual(Date.now());
    // the same sheet again: every row is already there, nothing is added
    const snap = await snapshot();
    const again = await importCsv(
      't,station,sensor,ta_umol_kg\n2026-07-14T06:00:00Z,back,bottle-back,2291.4\n',
    );
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/lab\.csv row 2: is already in the archive \(received /);
    expect(await snapshot()).toEqual(snap);
  });

  it('imports nothing when one row is bad, and lists every bad row with its reasons', async () => {
    const snap = await snapshot();
    const r = await importCsv(
      [
        't,station,sensor,ta_umol_kg,o2_umol_kg',
        '2026-07-14T06:00:00Z,back,bottle-back,2291.4,201.5',
        '2026-07-14T07:00:00Z,back,bottle-back,2.2914,',
        '2026-07-14T08:00:00Z,back,o2-back,2291,',
        '2026-07-14T06:00:00Z,back,bottle-back,2290,',
        '2026-09-01T06:00:00Z,back,bottle-back,2290,',
      ].join('\n'),
    );
    expect(r.code).toBe(2);
    const lines = r.stderr.trim().split('\n');
    expect(lines.filter((l) => l.includes('lab.csv row'))).toEqual([
      expect.stringMatching(/row 3: ta_umol_kg 2\.2914 looks like mmol\/kg/),
      expect.stringMatching(/row 4: back\/o2-back is an oxygen sensor, not a sample sensor/),
      expect.stringMatching(/row 5: repeats row 2 \(same station, sensor and time\)/),
      expect.stringMatching(/row 6: t 2026-09-01T06:00:00Z is outside the deployment in the archive/),
    ]);
    expect(lines.at(-1)).toBe(
      'reefd samples import: 4 of 5 rows rejected; nothing was imported. Fix them and run again.',
    );
    expect(await snapshot()).toEqual(snap);
  });

  it('a failed archive write imports nothing and exits 1', async () => {
    // Today's archive file cannot be opened (a folder stands in its place): the writer rejects the batch.
    const today = new Date().toISOString().slice(0, 10);
    await mkdir(path.join(archive, `raw-${today}.ndjson`));
    const snap = await snapshot();
    const r = await importCsv('t,station,sensor,ta_umol_kg\n2026-07-14T06:00:00Z,back,bottle-back,2291.4\n');
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/writing the archive failed \(.*\); nothing was imported/);
    expect(await snapshot()).toEqual(snap);
    const samples = [];
    for await (const e of readArchive(archive)) if (e.line?.topic.includes('/sample/')) samples.push(e);
    expect(samples).toEqual([]);
  });

  it('--dry-run checks and writes nothing', async () => {
    const snap = await snapshot();
    const r = await importCsv('t,station,sensor,ph_total\n2026-07-14T06:00:00Z,back,bottle-back,8.02\n', [
      '--dry-run',
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/all 1 rows are good; nothing written/);
    expect(await snapshot()).toEqual(snap);
  });

  it('exits 2 on a broken sheet, bad columns, an empty archive or missing arguments', async () => {
    expect(
      (await importCsv('t,station,sensor,ta_umol_kg\n2026-07-14T06:00:00Z,back,"bottle-back,2291\n')).stderr,
    ).toMatch(/lab\.csv row 2: a quoted field is not closed; nothing was imported/);
    const cols = await importCsv('time,station,sensor,ta_umol_kg\n');
    expect(cols.code).toBe(2);
    expect(cols.stderr).toMatch(/row 1: the column "t" is missing/);
    const empty = path.join(dir, 'empty');
    await mkdir(empty);
    await writeFile(
      path.join(dir, 'lab.csv'),
      't,station,sensor,ta_umol_kg\n2026-07-14T06:00:00Z,back,bottle-back,2291\n',
    );
    const io = captureIo();
    expect(
      await run(['import', '--config', cfg, '--csv', path.join(dir, 'lab.csv'), '--archive', empty], io),
    ).toBe(2);
    expect(io.text().stderr).toMatch(/holds no accepted messages of site ornen-reef/);
    const io2 = captureIo();
    expect(await run(['import', '--config', cfg], io2)).toBe(2);
    expect(io2.text().stderr).toMatch(/--config, --csv and --archive are required/);
    expect(await readFile(path.join(archive, `raw-${day}.ndjson`), 'utf8')).not.toContain('sample');
  });
});
