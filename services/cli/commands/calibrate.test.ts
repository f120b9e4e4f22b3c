// `reefd calibrate` on a deployment with the faults of issue 16: the back reef pCO2 sensor reads 12 uatm
// high and the mid-flat optode loses 1.5 % of its gain a day. Bottles (TA, DIC and reference O2 from the
// reef model's truth, with lab noise and one bad bottle) are taken every 3 h at both stations.
import { mkdir, mkdtemp, readFile, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCalibrationText, type CalibrationEntry } from '../../../libs/calibration/index.js';
import { parseConfigText } from '../../../libs/contract/index.js';
import { simulateMessages, type StationTruth } from '../../../libs/simulator/index.js';
import { LATE_CONFIG } from '../../../test/unit/inner-transect-config.js';
import { captureIo } from '../testing.js';
import { run } from './calibrate.js';

const START = Date.UTC(2026, 6, 14);
const DAYS = 4;
const DAY = 86_400_000;
let dir: string;
let cfg: string;
let archive: string;
const iso = (ms: number) => new Date(ms).toISOString();

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-calibrate-'));
  cfg = path.join(dir, 'site.yaml');
  archive = path.join(dir, 'archive');
  await mkdir(archive);
  await writeFile(cfg, LATE_CONFIG);
  const parsed = parseConfigText(LATE_CONFIG);
  if (!parsed.ok) throw new Error('config');
  const sim = simulateMessages(parsed.config, {
    startMs: START,
    durationMs: DAYS * DAY,
    seed: 8,
    faults: false,
  });
  const truth = new Map<string, StationTruth>();
  for (const r of sim.truth) if (r.kind === 'station') truth.set(`${r.station}|${r.t}`, r);
  let k = 0;
  const noise = () => ((k = (k * 48271 + 11) % 2147483647) / 2147483647 - 0.5) * 2; // uniform -1..1, seeded
  const lines: { tMs: number; text: string }[] = [];
  for (const m of sim.messages) {
    if (m.topic.includes('/sample/')) continue;
    const p = { ...m.payload };
    const days = (m.tMs - START) / DAY;
    if (m.topic.endsWith('/pco2/co2-back')) p.pco2_uatm = (p.pco2_uatm as number) + 12;
    if (m.topic.endsWith('/oxygen/o2-flat')) p.o2_umol_l = (p.o2_umol_l as number) * (1 - 0.015 * days);
    lines.push({ tMs: m.tMs, text: JSON.stringify({ topic: m.topic, rx: iso(m.tMs + 250), msg: p }) });
  }
  for (let t = START + 2 * 3600_000; t < START + DAYS * DAY - 3600_000; t += 3 * 3600_000) {
    for (const st of ['flat', 'back']) {
      const w = truth.get(`${st}|${iso(t)}`)!;
      const msg = {
        v: 1,
        t: iso(t),
        ta_umol_kg: w.ta_umol_kg + 2 * noise(),
        dic_umol_kg: w.dic_umol_kg + 2 * noise(),
        o2_umol_kg: w.o2_umol_kg * (1 + 0.002 * noise()),
        sal: w.sal,
      };
      if (st === 'back' && t === START + 14 * 3600_000) msg.dic_umol_kg += 40; // a bad bottle
      lines.push({
        tMs: t,
        text: JSON.stringify({
          topic: `reef/ornen-reef/${st}/sample/bottle-${st}`,
          rx: iso(t + DAYS * DAY),
          msg,
        }),
      });
    }
  }
  // lab results received after the deployment, in the last day's file
  lines.sort((a, b) => a.tMs - b.tMs);
  await writeFile(path.join(archive, 'raw-2026-07-14.ndjson'), lines.map((l) => l.text).join('\n') + '\n');
}, 120_000);

describe('reefd calibrate', () => {
  let entries: CalibrationEntry[];
  let stdout: string;

  it('fits the corrupted sensors and writes a valid calibration file', async () => {
    const out = path.join(dir, 'cal.yaml');
    const io = captureIo();
    const code = await run(['--config', cfg, '--input', archive, '--out', out], io);
    stdout = io.text().stdout;
    expect(code, io.text().stderr + stdout).toBe(0);
    const site = parseConfigText(LATE_CONFIG);
    if (!site.ok) throw new Error('config');
    const r = parseCalibrationText(await readFile(out, 'utf8'), site.config);
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    entries = r.entries;
    expect(entries.map((e) => `${e.sensor} ${e.field}`).sort()).toEqual([
      'back/co2-back pco2_uatm',
      'back/o2-back o2_mg_l', // the back reef optode reports mg/L
      'flat/co2-flat pco2_uatm',
      'flat/o2-flat o2_umol_l',
    ]);
  }, 120_000);

  it('finds the 12 uatm offset of the back reef sensor (and none on the flat)', () => {
    const back = entries.find((e) => e.sensor === 'back/co2-back')!;
    const flat = entries.find((e) => e.sensor === 'flat/co2-flat')!;
    // Neither sensor drifts: the drifts the bottles cannot tell from zero are dropped (constant fits), and
    // the offsets land within 2 SE (~0.8 uatm here) of -12 and 0.
    expect(back.offset).toBeGreaterThan(-13.6);
    expect(back.offset).toBeLessThan(-10.4);
    expect(Math.abs(flat.offset)).toBeLessThan(1.6);
    expect([back.drift_per_day, flat.drift_per_day]).toEqual([0, 0]);
    expect(back.slope).toBe(1);
  });

  it('finds the optode gain drift of 1.5 %/day as a slope drift (and none on the back reef optode)', () => {
    const flat = entries.find((e) => e.sensor === 'flat/o2-flat')!;
    const back = entries.find((e) => e.sensor === 'back/o2-back')!;
    // 1/(1 - 0.015 d) over 4 days: best line slope ~1.0 and ~1.6 %/day
    expect(flat.slope_drift_per_day).toBeGreaterThan(0.0145);
    expect(flat.slope_drift_per_day).toBeLessThan(0.0175);
    expect(Math.abs(flat.slope - 1)).toBeLessThan(0.01);
    expect(Math.abs(back.slope_drift_per_day)).toBeLessThan(0.002);
    expect(flat.offset).toBe(0);
    expect(flat.from).toMatch(/^2026-07-14T00:0/);
  });

  it('prints each fit with its standard errors and every bottle, marking the bad bottle an outlier', () => {
    expect(stdout).toMatch(
      /back\/co2-back pco2_uatm: 31 bottle\(s\) within 10 min: offset -?\d+\.\d+ \+- \d/,
    );
    expect(stdout).toMatch(/drift -?[\d.]+ \+- [\d.]+ uatm\/d is within 2 SE of zero: fitted constant/);
    expect(stdout).toMatch(/2026-07-14T14:00:00Z .* 0\.00 {2}outlier/);
    expect(stdout).toMatch(
      /flat\/o2-flat o2_umol_l: 31 bottle\(s\) within 10 min: slope (0\.99|1\.00)\d+ \+- [\d.e-]+, slope_drift_per_day 0\.01\d+ \+- [\d.e-]+ \/d/,
    );
  });

  it('refuses a fit of too few bottles with exit 2 and writes nothing', async () => {
    const few = path.join(dir, 'few');
    await mkdir(few);
    const text = (await readFile(path.join(archive, 'raw-2026-07-14.ndjson'), 'utf8'))
      .split('\n')
      .filter(
        (l) =>
          !l.includes('/sample/') ||
          l.includes('"t":"2026-07-14T02:00:00.000Z"') ||
          l.includes('"t":"2026-07-15T02:00:00.000Z"'),
      )
      .join('\n');
    await writeFile(path.join(few, 'raw-2026-07-14.ndjson'), text);
    const out = path.join(dir, 'few.yaml');
    const io = captureIo();
    expect(await run(['--config', cfg, '--input', few, '--out', out, '--sensor', 'back/co2-back'], io)).toBe(
      2,
    );
    expect(io.text().stdout).toMatch(
      /back\/co2-back pco2_uatm: 2 bottle\(s\) within 10 min: REFUSED \(REEFD_CALIBRATION_TOO_FEW\): 2 bottle-sensor pair\(s\) for back\/co2-back; at least 4 are needed/,
    );
    expect(io.text().stderr).toMatch(/1 of 1 fit\(s\) refused \(see above\); .*few\.yaml not written/);
    await expect(readFile(out, 'utf8')).rejects.toThrow();
  });

  it('refits the sensors it fits, carries the other entries of the configured file over, and skips excluded readings', async () => {
    const sub = path.join(dir, 'with-files');
    await mkdir(sub, { recursive: true });
    await writeFile(
      path.join(sub, 'old-cal.yaml'),
      [
        '- { sensor: back/ctd-back, field: temp_c, offset: 0.01 }',
        '- { sensor: back/co2-back, field: pco2_uatm, offset: -30 }', // stale: replaced by the refit
        '',
      ].join('\n'),
    );
    // a whole day of the back reef's optode excluded: its fit uses the other three days' bottles
    await writeFile(
      path.join(sub, 'log.yaml'),
      '- { t: 2026-07-15T00:00:00Z, station: back, sensor: o2-back, event: swap, exclude_from: 2026-07-15T00:00:00Z, exclude_to: 2026-07-16T00:00:00Z }\n',
    );
    const subCfg = path.join(sub, 'site.yaml');
    await writeFile(subCfg, `${LATE_CONFIG}calibration_file: old-cal.yaml\nlogbook_file: log.yaml\n`);
    const out = path.join(sub, 'cal.yaml');
    const io = captureIo();
    expect(await run(['--config', subCfg, '--input', archive, '--out', out], io), io.text().stderr).toBe(0);
    const site = parseConfigText(LATE_CONFIG);
    if (!site.ok) throw new Error('config');
    const r = parseCalibrationText(await readFile(out, 'utf8'), site.config);
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    const by = new Map(r.entries.map((e) => [e.sensor, e]));
    expect([...by.keys()].sort()).toEqual([
      'back/co2-back',
      'back/ctd-back',
      'back/o2-back',
      'flat/co2-flat',
      'flat/o2-flat',
    ]);
    expect(by.get('back/ctd-back')?.offset).toBe(0.01);
    // fitted against the raw readings, not the stale -30 correction
    expect(by.get('back/co2-back')?.offset).toBeGreaterThan(-13.6);
    expect(by.get('back/co2-back')?.offset).toBeLessThan(-10.4);
    expect(io.text().stdout).toMatch(/back\/o2-back o2_mg_l: 23 bottle\(s\) within 10 min/);
    expect(io.text().stderr).toMatch(/wrote 5 correction\(s\) .* \(1 carried over unchanged\)/);
    expect(await readFile(out, 'utf8')).toMatch(
      /# carried over from old-cal\.yaml\n- sensor: back\/ctd-back/,
    );
  }, 120_000);

  it('exits 2 on usage errors', async () => {
    const cases: [string[], RegExp][] = [
      [['--config', cfg, '--input', archive], /--config, --input and --out are required/],
      [
        ['--config', cfg, '--input', archive, '--out', 'x.yaml', '--match-min', 'ten'],
        /--match-min must be a number/,
      ],
      [
        ['--config', cfg, '--input', archive, '--out', 'x.yaml', '--sensor', 'back/nope'],
        /--sensor back\/nope is not a sensor/,
      ],
      [['--config', cfg, '--input', path.join(dir, 'missing'), '--out', 'x.yaml'], /does not exist/],
      [
        ['--config', cfg, '--input', archive, '--out', 'x.yaml', '--drift', '--no-drift'],
        /give --drift or --no-drift, not both/,
      ],
    ];
    for (const [argv, msg] of cases) {
      const io = captureIo();
      expect(await run(argv, io), argv.join(' ')).toBe(2);
      expect(io.text().stderr).toMatch(msg);
    }
  });
});
