// The CLI front door: help, version, unknown commands, `config check` exit codes (contract section 5) and
// `config schema` (docs/contract-v1.md, commands).
import { fileURLToPath } from 'node:url';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { COMMANDS, main } from './main.js';
import { captureIo } from './testing.js';

const file = (rel: string) => fileURLToPath(new URL(`../../${rel}`, import.meta.url));

describe('reefd', () => {
  it('prints the version from package.json', async () => {
    const io = captureIo();
    expect(await main(['--version'], io)).toBe(0);
    expect(io.text().stdout).toMatch(/^reefd \d+\.\d+\.\d+\n$/);
  });

  it('lists every contract command in its help', async () => {
    const io = captureIo();
    expect(await main(['--help'], io)).toBe(0);
    for (const name of ['run', 'replay', 'config', 'carbonate', 'simulate'])
      expect(io.text().stdout).toContain(`  ${name} `);
  });

  it('exits 2 on an unknown command', async () => {
    const io = captureIo();
    expect(await main(['frobnicate'], io)).toBe(2);
    expect(io.text().stderr).toContain('unknown command "frobnicate"');
  });

  it('gives every command a --help that exits 0', async () => {
    for (const name of Object.keys(COMMANDS)) {
      const io = captureIo();
      const code = await main([name, '--help'], io);
      expect([0, 2], name).toContain(code);
      if (code === 0) expect(io.text().stdout.length, name).toBeGreaterThan(20);
    }
  });
});

describe('reefd config check', () => {
  it('exits 0 with a one-line summary for a valid file', async () => {
    const io = captureIo();
    expect(await main(['config', 'check', file('deploy/demo/ornen-reef.yaml')], io)).toBe(0);
    expect(io.text().stdout).toMatch(/valid: site ornen-reef, 7 stations, \d+ sensors, 2 transects\n$/);
  });

  it('exits 2 and prints each problem as path: message', async () => {
    const io = captureIo();
    expect(await main(['config', 'check', file('test/fixtures/config/invalid.yaml')], io)).toBe(2);
    const lines = io.text().stdout.trim().split('\n');
    expect(lines).toContain(
      'stations.crest.sensors.p1.height_m: Too small: expected number to be >=0 (line 7)',
    );
    expect(lines.every((l) => /^[\w.()-]+: .+/.test(l))).toBe(true);
  });

  it('notes that a file without sources would not run (valid for replay: exit 0)', async () => {
    const io = captureIo();
    expect(await main(['config', 'check', file('test/fixtures/config/minimal.yaml')], io)).toBe(0);
    expect(io.text().stderr).toMatch(/note: no sources: reefd run refuses this file \(REEFD_NO_SOURCE\)/);
    const dir = mkdtempSync(join(tmpdir(), 'reefd-check-'));
    const withSource = join(dir, 'site.yaml');
    writeFileSync(
      withSource,
      'site: s\nreef_axis_deg: 270\nstations: {}\nsources: { mqtt: { url: "mqtt://127.0.0.1:1" } }\n',
    );
    const ok = captureIo();
    expect(await main(['config', 'check', withSource], ok)).toBe(0);
    expect(ok.text().stderr).toBe('');
    rmSync(dir, { recursive: true, force: true });
  });

  it('exits 2 for a missing file', async () => {
    const io = captureIo();
    expect(await main(['config', 'check', '/nonexistent/reefd.yaml'], io)).toBe(2);
    expect(io.text().stderr).toContain('cannot read');
  });

  it('exits 2 without a file', async () => {
    expect(await main(['config', 'check'], captureIo())).toBe(2);
  });
});

describe('reefd config schema', () => {
  it('prints the JSON Schema of the configuration on stdout and exits 0', async () => {
    const io = captureIo();
    expect(await main(['config', 'schema'], io)).toBe(0);
    const printed = JSON.parse(io.text().stdout) as { $schema: string; properties: Record<string, unknown> };
    expect(printed.$schema).toBe('http://json-schema.org/draft-07/schema#');
    expect(Object.keys(printed.properties)).toContain('stations');
    expect(io.text().stderr).toBe('');
  });

  it('exits 2 on an argument it does not take', async () => {
    const io = captureIo();
    expect(await main(['config', 'schema', 'extra'], io)).toBe(2);
    expect(io.text().stderr).toContain('expected "check FILE" or "schema"');
  });
});

// The systemd unit stops restarting on exit 2 (RestartPreventExitStatus=2, test/unit/systemd-unit.test.ts):
// every configuration error of `reefd run` must exit 2, before anything is started.
describe('reefd run on a configuration error', () => {
  it('exits 2 with every problem for an invalid file', async () => {
    const io = captureIo();
    const bad = file('test/fixtures/config/invalid.yaml');
    expect(await main(['run', '--config', bad, '--log-level', 'silent'], io)).toBe(2);
    expect(io.text().stderr).toContain('reef_axis_deg');
    const problems = io
      .text()
      .stderr.split('\n')
      .filter((l) => l.startsWith(bad));
    expect(problems.length).toBeGreaterThan(3);
  });

  it('exits 2 for a file that cannot be read', async () => {
    const io = captureIo();
    expect(await main(['run', '--config', '/nonexistent/reefd.yaml', '--log-level', 'silent'], io)).toBe(2);
    expect(io.text().stderr).toMatch(
      /^reefd run: REEFD_CONFIG_UNREADABLE: cannot read \/nonexistent\/reefd\.yaml: ENOENT.*check the path/,
    );
  });
});
