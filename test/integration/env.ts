// Addresses of the real services the integration, end-to-end and fault tests run against.
// deploy/dev/services.sh starts them on these loopback ports (deploy/dev/services.env);
// each can be overridden through the environment. Tests against real services never skip:
// a missing service is a loud failure that says how to start it.
import { randomBytes } from 'node:crypto';
import { connect } from 'node:net';

function fromEnv(name: string, fallback: string): string {
  const value = process.env[name];
  return value !== undefined && value.trim() !== '' ? value.trim() : fallback;
}

/** Mosquitto (MQTT 3.1.1/5), anonymous, loopback only. */
export const MQTT_URL = fromEnv('REEFD_TEST_MQTT_URL', 'mqtt://127.0.0.1:11883');
/** Kafka bootstrap brokers (single-node KRaft), as `host:port` strings. */
export const KAFKA_BROKERS: readonly string[] = Object.freeze(
  fromEnv('REEFD_TEST_KAFKA_BROKERS', '127.0.0.1:19092')
    .split(',')
    .map((b) => b.trim())
    .filter((b) => b !== ''),
);
/** VictoriaMetrics single-node HTTP API (also serves the InfluxDB v2 write endpoint /api/v2/write). */
export const VM_URL = fromEnv('REEFD_TEST_VM_URL', 'http://127.0.0.1:18428');
/** InfluxDB 1.x HTTP API (/ping, /write, /query), auth off. */
export const INFLUX1_URL = fromEnv('REEFD_TEST_INFLUX1_URL', 'http://127.0.0.1:18086');

export const START_HINT =
  'start them with `deploy/dev/services.sh up` (see deploy/dev/services.env for the addresses)';

/** Stable error code for "a real service the suite needs is not there". */
export const SERVICE_UNREACHABLE = 'REEFD_TEST_SERVICE_UNREACHABLE';

export class ServiceUnreachableError extends Error {
  readonly code = SERVICE_UNREACHABLE;
  constructor(
    readonly service: string,
    readonly url: string,
    cause: string,
  ) {
    super(
      `${SERVICE_UNREACHABLE}: ${service} is not reachable at ${url} (${cause}). ` +
        `Integration tests need the real services and never skip: ${START_HINT}.`,
    );
    this.name = 'ServiceUnreachableError';
  }
}

/** `mqtt://h:p`, `http://h:p/...` or a bare `h:p` (Kafka) -> host and port. */
export function hostPort(url: string): { host: string; port: number } {
  const first = url.split(',')[0]?.trim() ?? '';
  const withScheme = first.includes('://') ? first : `tcp://${first}`;
  const parsed = new URL(withScheme);
  const defaults: Record<string, number> = { 'mqtt:': 1883, 'http:': 80, 'https:': 443 };
  const port = parsed.port !== '' ? Number(parsed.port) : defaults[parsed.protocol];
  if (parsed.hostname === '' || port === undefined || !Number.isInteger(port)) {
    throw new Error(`REEFD_TEST_BAD_SERVICE_URL: cannot read host and port from "${url}"`);
  }
  return { host: parsed.hostname.replace(/^\[|\]$/g, ''), port };
}

/**
 * Resolves when a TCP connection to the service's address succeeds within `timeoutMs`;
 * otherwise rejects with a ServiceUnreachableError naming `deploy/dev/services.sh up`.
 */
export async function requireService(name: string, url: string, timeoutMs = 3_000): Promise<void> {
  let target: { host: string; port: number };
  try {
    target = hostPort(url);
  } catch (err) {
    throw new ServiceUnreachableError(name, url, (err as Error).message);
  }
  await new Promise<void>((resolve, reject) => {
    const socket = connect({ host: target.host, port: target.port });
    const fail = (cause: string): void => {
      socket.destroy();
      reject(new ServiceUnreachableError(name, url, cause));
    };
    socket.setTimeout(timeoutMs, () => fail(`no TCP answer within ${timeoutMs} ms`));
    socket.once('error', (err: NodeJS.ErrnoException) => fail(err.code ?? err.message));
    socket.once('connect', () => {
      socket.end();
      socket.destroy();
      resolve();
    });
  });
}

/** 12 random hex characters, for names that must not collide between runs or tests. */
export function randomSuffix(): string {
  return randomBytes(6).toString('hex');
}

/** A fresh topic name for one test: `reefd-it-<random>`. */
export function itTopic(): string {
  return `reefd-it-${randomSuffix()}`;
}

/** A fresh database / measurement name for one test: `reefd_it_<random>`. */
export function itDatabase(): string {
  return `reefd_it_${randomSuffix()}`;
}

/**
 * Polls `probe` every `intervalMs` until it returns a value other than undefined, or throws
 * after `timeoutMs` with `what` and the last probe error in the message.
 */
export async function pollUntil<T>(
  what: string,
  probe: () => Promise<T | undefined>,
  timeoutMs: number,
  intervalMs = 100,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let lastError = '';
  for (;;) {
    try {
      const value = await probe();
      if (value !== undefined) return value;
    } catch (err) {
      lastError = ` (last error: ${(err as Error).message})`;
    }
    if (Date.now() >= deadline)
      throw new Error(`REEFD_TEST_TIMEOUT: ${what} not seen within ${timeoutMs} ms${lastError}`);
    await new Promise((r) => setTimeout(r, intervalMs));
  }
}
