import { describe, it, expect } from 'vitest';
import { chmod, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { notifyConfigSchema } from '../../libs/alerts/index.js';
import { resolveSecret } from '../config/load.js';
import { channelsFromConfig, notifierOptionsFromConfig } from './index.js';
import { tempDir } from './test-helpers.js';

describe('secrets', () => {
  it('reads { env } and { file } references (the daemon-wide resolver) and says what is missing', async () => {
    expect(await resolveSecret({ env: 'HOOK' }, { HOOK: 'abc' })).toBe('abc');
    await expect(resolveSecret({ env: 'HOOK' }, {})).rejects.toThrow(/environment variable HOOK is not set/);
    const dir = await tempDir();
    await writeFile(join(dir, 'pass'), 'pa55\n');
    // a secret file others can read is refused, with the command that fixes it
    await chmod(join(dir, 'pass'), 0o644);
    await expect(resolveSecret({ file: join(dir, 'pass') }, {})).rejects.toThrow(/chmod 600/);
    await chmod(join(dir, 'pass'), 0o600);
    expect(await resolveSecret({ file: join(dir, 'pass') }, {})).toBe('pa55'); // the trailing newline dropped
    await expect(resolveSecret({ file: join(dir, 'nope') }, {})).rejects.toThrow(/does not exist/);
  });
});

describe('channels from the notify: config', () => {
  it('builds each configured channel with its severity filter and rate limit', async () => {
    const cfg = notifyConfigSchema.parse({
      channels: {
        hook: {
          type: 'webhook',
          url: 'http://127.0.0.1:9/x',
          secret: { env: 'HOOK' },
          min_severity: 'warning',
        },
        mail: {
          type: 'smtp',
          host: '127.0.0.1',
          from: 'a@example.invalid',
          to: ['b@example.invalid'],
          rate_limit: { max_messages: 2, per_min: 30 },
        },
        off: { type: 'dashboard', enabled: false },
        ui: { type: 'dashboard' },
      },
      renotify_min: 60,
    });
    const chs = await channelsFromConfig(cfg, { site: 'demo-reef', env: { HOOK: 'abc' } });
    expect(chs.map((c) => [c.id, c.minSeverity, c.rateLimit])).toEqual([
      ['hook', 'warning', undefined],
      ['mail', 'info', { maxMessages: 2, perMs: 1_800_000 }],
      ['ui', 'info', undefined],
    ]);
    expect(notifierOptionsFromConfig(cfg)).toEqual({
      groupWindowMs: 30_000,
      renotifyMs: 3_600_000,
      digestThreshold: 20,
      rateLimit: { maxMessages: 6, perMs: 3_600_000 },
      retry: { baseMs: 5000, maxMs: 900_000 },
    });
  });
  it('refuses an mqtt channel without a client and a missing secret', async () => {
    const m = notifyConfigSchema.parse({ channels: { bus: { type: 'mqtt', topic: 'reef/x/alerts' } } });
    await expect(channelsFromConfig(m, { site: 's', env: {} })).rejects.toThrow(/REEFD_NOTIFY_NO_MQTT/);
    const h = notifyConfigSchema.parse({
      channels: { h: { type: 'webhook', url: 'http://127.0.0.1:9/', secret: { env: 'X' } } },
    });
    await expect(channelsFromConfig(h, { site: 's', env: {} })).rejects.toMatchObject({
      code: 'REEFD_SECRET_MISSING',
    });
  });
});
