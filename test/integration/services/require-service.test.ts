// The shared helper must fail loudly (never skip) when a service is not there, and say how to start it.
import { describe, expect, it } from 'vitest';
import {
  KAFKA_BROKERS,
  MQTT_URL,
  ServiceUnreachableError,
  hostPort,
  itDatabase,
  itTopic,
  requireService,
} from '../env.js';

describe('requireService', () => {
  it('rejects with REEFD_TEST_SERVICE_UNREACHABLE naming deploy/dev/services.sh up for a closed port', async () => {
    // Port 1 (tcpmux) is not served on a dev machine's loopback (common practice).
    const err = await requireService('nothing', 'mqtt://127.0.0.1:1').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ServiceUnreachableError);
    expect((err as ServiceUnreachableError).code).toBe('REEFD_TEST_SERVICE_UNREACHABLE');
    expect((err as Error).message).toContain('deploy/dev/services.sh up');
    expect((err as Error).message).toContain('ECONNREFUSED');
    expect((err as Error).message).toContain('nothing is not reachable at mqtt://127.0.0.1:1');
  });

  it('resolves for the running broker', async () => {
    await expect(requireService('mosquitto', MQTT_URL)).resolves.toBeUndefined();
  });

  it('reads host and port from mqtt, http and bare Kafka addresses', () => {
    expect(hostPort('mqtt://127.0.0.1:11883')).toEqual({ host: '127.0.0.1', port: 11883 });
    expect(hostPort('http://127.0.0.1:18428/api')).toEqual({ host: '127.0.0.1', port: 18428 });
    expect(hostPort('127.0.0.1:19092,127.0.0.1:19094')).toEqual({ host: '127.0.0.1', port: 19092 });
    expect(hostPort('mqtt://localhost')).toEqual({ host: 'localhost', port: 1883 });
    expect(KAFKA_BROKERS.length).toBeGreaterThan(0);
  });

  it('makes fresh names in the agreed shapes', () => {
    expect(itTopic()).toMatch(/^reefd-it-[0-9a-f]{12}$/);
    expect(itDatabase()).toMatch(/^reefd_it_[0-9a-f]{12}$/);
    expect(itTopic()).not.toBe(itTopic());
  });
});
