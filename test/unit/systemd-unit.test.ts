// The systemd unit (deploy/systemd/reefd.service): a configuration error must not crash-loop, secrets come
// through systemd's credentials, and the unit's keys sit in the sections systemd reads them from.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { EXIT_USAGE } from '../../services/cli/io.js';

const unitFile = new URL('../../deploy/systemd/reefd.service', import.meta.url);
const operations = readFileSync(new URL('../../deploy/OPERATIONS.md', import.meta.url), 'utf8');

/** section -> key -> values, in file order (keys may repeat). */
function parseUnit(text: string): Map<string, Map<string, string[]>> {
  const out = new Map<string, Map<string, string[]>>();
  let section: Map<string, string[]> | undefined;
  for (const raw of text.split('\n')) {
    const line = raw.trim();
    if (line === '' || line.startsWith('#')) continue;
    const head = /^\[(\w+)\]$/.exec(line);
    if (head) {
      section = new Map();
      out.set(head[1]!, section);
      continue;
    }
    const eq = line.indexOf('=');
    if (section === undefined || eq < 1) throw new Error(`not a unit line: ${line}`);
    const key = line.slice(0, eq);
    section.set(key, [...(section.get(key) ?? []), line.slice(eq + 1)]);
  }
  return out;
}

const unit = parseUnit(readFileSync(unitFile, 'utf8'));
const service = unit.get('Service')!;

describe('deploy/systemd/reefd.service', () => {
  it('does not restart on the exit code of a configuration error (2), and restarts on the others', () => {
    expect(EXIT_USAGE).toBe(2);
    expect(service.get('RestartPreventExitStatus')).toEqual([String(EXIT_USAGE)]);
    expect(service.get('Restart')).toEqual(['always']);
  });

  it('bounds the restarts in [Unit], where systemd reads the start limit', () => {
    expect(unit.get('Unit')!.get('StartLimitIntervalSec')).toEqual(['600']);
    expect(unit.get('Unit')!.get('StartLimitBurst')).toEqual(['20']);
    expect(service.has('StartLimitIntervalSec')).toBe(false);
    expect(service.has('StartLimitBurst')).toBe(false);
  });

  it('passes secrets as credentials, never through the environment', () => {
    expect(service.get('LoadCredential')).toEqual(['reefd:/etc/reefd/credentials']);
    expect(service.has('EnvironmentFile')).toBe(false);
    for (const env of service.get('Environment') ?? []) expect(env).not.toMatch(/token|pass|secret|key/i);
    // The operator's page names the same folder and the path reefd reads a credential from.
    expect(operations).toContain('LoadCredential=reefd:/etc/reefd/credentials');
    expect(operations).toContain('/run/credentials/reefd.service/reefd_influx-token');
  });

  // systemd's own check of the file, where the machine has systemd (a CI runner or a field server).
  const analyze = spawnSync('systemd-analyze', ['--version'], { encoding: 'utf8' });
  it.skipIf(analyze.status !== 0)('passes systemd-analyze verify with no warning', () => {
    const r = spawnSync('systemd-analyze', ['verify', decodeURIComponent(unitFile.pathname)], {
      encoding: 'utf8',
      timeout: 30_000,
    });
    const complaints = `${r.stdout}${r.stderr}`
      .split('\n')
      // The field server's paths and user, not this machine's, are named in the unit.
      .filter((l) => l.trim() !== '' && !/\/opt\/reefd|\/usr\/bin\/node|reefd\.js|user reefd/i.test(l));
    expect(complaints).toEqual([]);
  });
});
