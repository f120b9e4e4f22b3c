// `reefd logbook add|list`: entries checked against the configuration, appended atomically, comments kept.
import { mkdtemp, readFile, readdir, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { beforeEach, describe, expect, it } from 'vitest';
import { parseLogbookText } from '../../../libs/logbook/index.js';
import { captureIo } from '../testing.js';
import { run, withLock } from './logbook.js';

const DEMO = path.resolve('deploy/demo/ornen-reef.yaml');
let dir: string;
let cfg: string;

beforeEach(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-logbook-'));
  cfg = path.join(dir, 'site.yaml');
  await writeFile(cfg, `${await readFile(DEMO, 'utf8')}\nlogbook_file: field-log.yaml\n`);
});

const add = (...extra: string[]) => {
  const io = captureIo();
  return run(['add', '--config', cfg, ...extra], io).then((code) => ({ code, ...io.text() }));
};

describe('reefd logbook add', () => {
  it('creates the file, then appends, keeping comments and earlier entries', async () => {
    const a = await add(
      '--station',
      'back',
      '--sensor',
      'adcp-back',
      '--event',
      'relevel',
      '--text',
      'diver bumped it',
      '--exclude-from',
      '2026-07-15T09:20:00Z',
      '--exclude-to',
      '2026-07-15T10:10:00Z',
      '--t',
      '2026-07-15T09:40:00Z',
    );
    expect(a.code, a.stderr).toBe(0);
    expect(a.stdout).toContain(
      'added relevel at back/adcp-back 2026-07-15T09:40:00Z, excluding 2026-07-15T09:20:00Z to 2026-07-15T10:10:00Z (1 entries)',
    );
    const file = path.join(dir, 'field-log.yaml');
    await writeFile(file, `# kept comment\n${await readFile(file, 'utf8')}`);
    const b = await add(
      '--station',
      'flat',
      '--event',
      'cleaning',
      '--text',
      'wiped: "all" sensors',
      '--t',
      '2026-07-16T08:00:00Z',
    );
    expect(b.code, b.stderr).toBe(0);
    const text = await readFile(file, 'utf8');
    expect(text.startsWith('# kept comment\n- t: 2026-07-15T09:40:00Z')).toBe(true);
    const r = parseLogbookText(text);
    expect(r.ok && r.entries.map((e) => [e.station, e.event, e.text])).toEqual([
      ['back', 'relevel', 'diver bumped it'],
      ['flat', 'cleaning', 'wiped: "all" sensors'],
    ]);
    expect((await readdir(dir)).sort()).toEqual(['field-log.yaml', 'site.yaml']); // no temp or lock left
  });

  it('defaults t to now (to the second)', async () => {
    const before = Math.floor(Date.now() / 1000) * 1000;
    expect((await add('--station', 'crest', '--event', 'note', '--text', 'turtle')).code).toBe(0);
    const r = parseLogbookText(await readFile(path.join(dir, 'field-log.yaml'), 'utf8'));
    const t = r.ok ? Date.parse(r.entries[0]!.t) : NaN;
    expect(t).toBeGreaterThanOrEqual(before);
    expect(t).toBeLessThanOrEqual(Date.now());
  });

  it('exits 2 with the reason for an unknown station or sensor, a bad event, a half exclusion or a bad time', async () => {
    const cases: [string[], RegExp][] = [
      [
        ['--station', 'reef9', '--event', 'note', '--text', 'x'],
        /--station station "reef9" is not in the configuration/,
      ],
      [
        ['--station', 'back', '--sensor', 'o9', '--event', 'note', '--text', 'x'],
        /--sensor station "back" has no sensor "o9"/,
      ],
      [['--station', 'back', '--event', 'scrub', '--text', 'x'], /--event must be one of cleaning, swap/],
      [
        ['--station', 'back', '--event', 'swap', '--text', 'x', '--exclude-from', '2026-07-15T09:20:00Z'],
        /--exclude-to an exclusion needs both/,
      ],
      [
        ['--station', 'back', '--event', 'swap', '--text', 'x', '--t', '15/07/2026'],
        /--t is not an ISO 8601 time with a zone/,
      ],
      [
        [
          '--station',
          'back',
          '--event',
          'swap',
          '--text',
          'x',
          '--exclude-from',
          '2026-07-15T10:00:00Z',
          '--exclude-to',
          '2026-07-15T09:00:00Z',
        ],
        /--exclude-to must be after exclude_from/,
      ],
      [['--event', 'note'], /--station and --event are required/],
    ];
    for (const [argv, msg] of cases) {
      const r = await add(...argv);
      expect(r.code, argv.join(' ')).toBe(2);
      expect(r.stderr, argv.join(' ')).toMatch(msg);
    }
    expect(await readdir(dir)).toEqual(['site.yaml']); // nothing written
  });

  it('refuses to append to a logbook that is already broken, leaving it as it was', async () => {
    const file = path.join(dir, 'field-log.yaml');
    const broken = '- t: 2026-07-15T09:40:00Z\n  station: nowhere\n  event: note\n  text: x\n';
    await writeFile(file, broken);
    const r = await add('--station', 'back', '--event', 'note', '--text', 'y');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/0\.station: station "nowhere" is not in the configuration \(line 2\)/);
    expect(await readFile(file, 'utf8')).toBe(broken);
  });

  it('explains how to configure logbook_file when the configuration has none', async () => {
    const io = captureIo();
    expect(
      await run(['add', '--config', DEMO, '--station', 'back', '--event', 'note', '--text', 'x'], io),
    ).toBe(2);
    expect(io.text().stderr).toMatch(/has no logbook_file; add a line such as "logbook_file: logbook.yaml"/);
  });

  it('waits for no one: a fresh lock held by another writer fails clearly, a stale one is taken over', async () => {
    const file = path.join(dir, 'field-log.yaml');
    await writeFile(`${file}.lock`, '1\n');
    const r = await add('--station', 'back', '--event', 'note', '--text', 'x');
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/field-log\.yaml\.lock is held by another logbook writer/);
    expect(await withLock(file, async () => 7, 0)).toBe(7); // stale after 0 ms: taken over
  });
});

describe('reefd logbook list', () => {
  it('prints the entries of one station', async () => {
    await add('--station', 'back', '--event', 'swap', '--text', 'new optode', '--t', '2026-07-15T09:40:00Z');
    await add('--station', 'flat', '--event', 'note', '--text', 'calm', '--t', '2026-07-15T10:00:00Z');
    const io = captureIo();
    expect(await run(['list', '--config', cfg, '--station', 'back'], io)).toBe(0);
    expect(io.text().stdout).toBe('2026-07-15T09:40:00Z  swap     back  new optode\n');
  });
});
