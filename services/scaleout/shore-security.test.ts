// The shore member's Kafka TLS and SASL come from the site files, resolved as the daemon resolves them.
import { describe, expect, it } from 'vitest';
import type { ReefdConfig } from '../../libs/contract/index.js';
import { shoreKafkaSecurity } from './shore-security.js';

function site(
  name: string,
  kafka: Record<string, unknown> | undefined,
  where: 'sources' | 'bridge' = 'sources',
) {
  const k = kafka === undefined ? undefined : { brokers: ['127.0.0.1:1'], topic: 'reef.raw', ...kafka };
  const config = {
    site: name,
    ...(k === undefined ? {} : where === 'sources' ? { sources: { kafka: k } } : { bridge: { kafka: k } }),
  } as unknown as ReefdConfig;
  return config;
}

describe('shoreKafkaSecurity', () => {
  it('resolves TLS files beside the site file and the SASL password from its secret reference', async () => {
    const s = await shoreKafkaSecurity(
      [
        { config: site('a', undefined), file: '/etc/reefd/sites/a.yaml' },
        {
          config: site('b', {
            tls: { ca_file: 'pki/ca.pem', cert_file: '/abs/client.pem', key_file: 'pki/client.key' },
            sasl: { mechanism: 'scram-sha-512', username: 'shore', password: { env: 'SHORE_PW' } },
          }),
          file: '/etc/reefd/sites/b.yaml',
        },
      ],
      { SHORE_PW: 'tide-7' },
    );
    expect(s.from).toBe('/etc/reefd/sites/b.yaml');
    expect(s.tls).toEqual({
      ca_file: '/etc/reefd/sites/pki/ca.pem',
      cert_file: '/abs/client.pem',
      key_file: '/etc/reefd/sites/pki/client.key',
      verify: undefined,
    });
    expect(s.sasl).toEqual({ mechanism: 'scram-sha-512', username: 'shore', password: 'tide-7' });
  });

  it("takes the edge's bridge.kafka when a site file has no sources.kafka", async () => {
    const s = await shoreKafkaSecurity(
      [{ config: site('a', { tls: { ca_file: 'ca.pem' } }, 'bridge'), file: '/srv/a.yaml' }],
      {},
    );
    expect(s.tls?.ca_file).toBe('/srv/ca.pem');
    expect(s.sasl).toBeUndefined();
  });

  it('gives no TLS and no SASL when no site file names any', async () => {
    const s = await shoreKafkaSecurity([{ config: site('a', {}), file: '/srv/a.yaml' }], {});
    expect(s).toEqual({ tls: undefined, sasl: undefined, from: undefined });
  });

  it('accepts the same files named from two folders, refuses two different settings', async () => {
    const same = await shoreKafkaSecurity(
      [
        { config: site('a', { tls: { ca_file: 'pki/ca.pem' } }), file: '/srv/a.yaml' },
        { config: site('b', { tls: { ca_file: '../pki/ca.pem' } }), file: '/srv/more/b.yaml' },
      ],
      {},
    );
    expect(same.tls?.ca_file).toBe('/srv/pki/ca.pem');
    await expect(
      shoreKafkaSecurity(
        [
          { config: site('a', { tls: { ca_file: 'ca.pem' } }), file: '/srv/a.yaml' },
          { config: site('b', { tls: { ca_file: 'other-ca.pem' } }), file: '/srv/b.yaml' },
        ],
        {},
      ),
    ).rejects.toMatchObject({
      code: 'REEFD_USAGE',
      message: expect.stringContaining('/srv/b.yaml and /srv/a.yaml'),
    });
  });

  it("fails with the loader's error when the SASL password is not set", async () => {
    await expect(
      shoreKafkaSecurity(
        [
          {
            config: site('a', { sasl: { mechanism: 'plain', username: 'u', password: { env: 'NOPE' } } }),
            file: '/srv/a.yaml',
          },
        ],
        {},
      ),
    ).rejects.toMatchObject({ code: 'REEFD_SECRET_MISSING' });
  });
});
