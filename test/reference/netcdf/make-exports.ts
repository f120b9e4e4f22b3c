// Builds the export fixture of the NetCDF reference check (test/reference/netcdf/generate.py): 12 h of the
// fictional Ornen Reef through `reefd replay` with a calibration file (the back reef's pCO2 sensor and the
// crest's optode corrected, so calibrated records are exported), one flux record revised, then `reefd
// export` to NetCDF and CSV. Writes OUT/records.ndjson, OUT/nc/*.nc, OUT/csv/*.csv and OUT/expect.json (every winning number
// with the file and variable it must be found in). Deterministic: fixed seed, SOURCE_DATE_EPOCH.
//   usage: tsx test/reference/netcdf/make-exports.ts OUT
import { mkdir, readFile, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { parseConfigText, RECORD_TYPE_SPECS, type DerivedRecord } from '../../../libs/contract/index.js';
import { simulateMessages } from '../../../libs/simulator/index.js';
import { run as exportRun } from '../../../services/cli/commands/export.js';
import { run as replayRun } from '../../../services/cli/commands/replay.js';
import { captureIo } from '../../../services/cli/testing.js';
import { GroupPlan, groupOf, variableNames } from '../../../services/export/cf.js';
import { fileNameOf } from '../../../services/export/netcdf.js';

export const CONFIG = path.resolve('deploy/demo/ornen-reef.yaml');
export const EPOCH = '1785000000'; // 2026-07-25T17:20:00Z

export async function makeExports(out: string): Promise<{ records: DerivedRecord[] }> {
  await mkdir(out, { recursive: true });
  const parsed = parseConfigText(await readFile(CONFIG, 'utf8'));
  if (!parsed.ok) throw new Error('demo config invalid');
  const sim = simulateMessages(parsed.config, {
    startMs: Date.UTC(2026, 6, 14),
    durationMs: 12 * 3600_000,
    seed: 21,
  });
  const raw = sim.messages.map((m) =>
    JSON.stringify({ topic: m.topic, rx: new Date(m.tMs + 250).toISOString(), msg: m.payload }),
  );
  await writeFile(path.join(out, 'raw-2026-07-14.ndjson'), `${raw.join('\n')}\n`);
  // The demo's configuration beside the archive, naming a calibration file.
  const site = path.join(out, 'site.yaml');
  await writeFile(site, `${await readFile(CONFIG, 'utf8')}\ncalibration_file: cal.yaml\n`);
  await writeFile(
    path.join(out, 'cal.yaml'),
    [
      '- { sensor: back/co2-back, field: pco2_uatm, from: 2026-07-14T00:00:00Z, offset: -12 }',
      '- { sensor: crest/o2-crest, field: o2_umol_l, from: 2026-07-14T00:00:00Z, slope_drift_per_day: 0.015 }',
      '',
    ].join('\n'),
  );
  const recFile = path.join(out, 'records.ndjson');
  const io = captureIo();
  const code = await replayRun(
    [
      '--config',
      site,
      '--input',
      path.join(out, 'raw-2026-07-14.ndjson'),
      '--out',
      recFile,
      '--flush-tail',
      '--quiet',
    ],
    io,
  );
  if (code !== 0) throw new Error(`replay failed: ${io.text().stderr}`);
  const lines = (await readFile(recFile, 'utf8')).trim().split('\n');
  const records = lines.map((l) => JSON.parse(l) as DerivedRecord);
  // A revision of one valid flux window (as a late bottle would make): only the revision may be exported.
  const i = records.findIndex((r) => r.type === 'flux' && r.valid === true);
  const revised = { ...records[i]!, ncp_mmol_m2_h: 12.345, revision: 1 } as DerivedRecord;
  records.push(revised);
  await writeFile(recFile, `${records.map((r) => JSON.stringify(r)).join('\n')}\n`);
  for (const format of ['netcdf', 'csv']) {
    const eio = captureIo({ SOURCE_DATE_EPOCH: EPOCH });
    const c = await exportRun(
      [
        '--records',
        recFile,
        '--format',
        format,
        '--out',
        path.join(out, format === 'netcdf' ? 'nc' : 'csv'),
        '--config',
        CONFIG,
        '--quiet',
      ],
      eio,
    );
    if (c !== 0) throw new Error(`export ${format} failed: ${eio.text().stderr}`);
  }
  // Expectations: every finite number of every winning record, with its file and variable.
  const winners = new Map<string, DerivedRecord>();
  for (const r of records)
    winners.set(
      `${r.type}|${r.t}|${String((r as Record<string, unknown>).station ?? (r as Record<string, unknown>).transect)}|${String((r as Record<string, unknown>).sensor ?? '')}`,
      r,
    );
  const plans = new Map<string, GroupPlan>();
  for (const r of winners.values()) {
    const g = groupOf(r);
    if (!g) continue;
    const k = `${g.subject}|${g.id}`;
    if (!plans.has(k)) plans.set(k, new GroupPlan(g));
    plans.get(k)!.add(r);
  }
  const names = new Map([...plans].map(([k, p]) => [k, variableNames(p)]));
  const expect: { file: string; variable: string; t: string; value: number }[] = [];
  for (const r of winners.values()) {
    const g = groupOf(r);
    if (!g) continue;
    const n = names.get(`${g.subject}|${g.id}`)!;
    const sensor = String((r as Record<string, unknown>).sensor ?? '');
    for (const [field, spec] of Object.entries(RECORD_TYPE_SPECS[r.type].fields)) {
      const v = (r as Record<string, unknown>)[field];
      if (spec.kind !== 'number' || typeof v !== 'number' || !Number.isFinite(v)) continue;
      const variable =
        field === 'flag' ? n.flags.get(`${r.type}|${sensor}`) : n.data.get(`${r.type}|${sensor}|${field}`);
      if (variable) expect.push({ file: fileNameOf(r.site, g.subject, g.id), variable, t: r.t, value: v });
    }
  }
  await writeFile(
    path.join(out, 'expect.json'),
    JSON.stringify({
      revised: { t: revised.t, transect: (revised as { transect: string }).transect },
      values: expect,
    }),
  );
  return { records };
}

if (process.argv[1] !== undefined && import.meta.url.endsWith(path.basename(process.argv[1]))) {
  const out = process.argv[2];
  if (!out) {
    process.stderr.write('usage: make-exports.ts OUT\n');
    process.exit(2);
  }
  await makeExports(out);
}
