// Where the data folder is: the configuration's data_dir, else systemd's StateDirectory, else beside the file.
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_DATA_DIR, resolveDataDir } from './load.js';

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
