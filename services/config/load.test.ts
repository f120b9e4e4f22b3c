// Where the data folder is: the configuration's data_dir, else systemd's StateDirectory, else beside the file.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_DATA_DIR, loadConfigOrThrow, resolveDataDir } from './load.js';

describe('resolveDataDir', () => {
  it('takes data_dir relative to the configuration folder, or as given when absolute', () => {
    expect(resolveDataDir({ data_dir: 'd' }, '/etc/reefd', {})).toBe('/etc/reefd/d');
    expect(
      resolveDataDir({ data_dir: '/srv/reefd' }, '/etc/reefd', { STATE_DIRECTORY: '/var/lib/reefd' }),
    ).toBe('/srv/reefd');
  });

  it("under systemd without data_dir: the unit's StateDirectory (writable in its sandbox), the first of a list", () => {
    expect(resolveDataDir({}, '/etc/reefd', { STATE_DIRECTORY: '/var/lib/reefd' })).toBe('/var/lib/reefd');
    expect(resolveDataDir({}, '/etc/reefd', { STATE_DIRECTORY: '/var/lib/reefd:/var/lib/other' })).toBe(
      '/var/lib/reefd',
    );
  });

  it('elsewhere: reefd-data beside the configuration file', () => {
    expect(resolveDataDir({}, '/home/ana/site', {})).toBe(path.join('/home/ana/site', DEFAULT_DATA_DIR));
  });
});

describe('the documented install (deploy/OPERATIONS.md) under the shipped unit', () => {
  it('puts the data folder where the unit lets reefd write', async () => {
    const unit = readFileSync(new URL('../../deploy/systemd/reefd.service', import.meta.url), 'utf8');
    const setting = (k: string) => unit.match(new RegExp(`^${k}=(.*)$`, 'm'))?.[1];
    expect(setting('ProtectSystem')).toBe('strict');
    expect(setting('StateDirectory')).toBe('reefd');
    const writable = (setting('ReadWritePaths') ?? '').split(/\s+/);
    // The install copies the demo site to /etc/reefd/site.yaml; systemd passes /var/lib/<StateDirectory>.
    const config = await loadConfigOrThrow(
      new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url).pathname,
    );
    const dataDir = resolveDataDir(config, '/etc/reefd', { STATE_DIRECTORY: '/var/lib/reefd' });
    expect(writable.some((w) => dataDir === w || dataDir.startsWith(`${w}/`))).toBe(true);
    expect(dataDir.startsWith('/etc/')).toBe(false);
  });
});
