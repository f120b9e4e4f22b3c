// A Mosquitto of the test's own with TLS (a throwaway CA made with openssl) and a password file, for the
// source's TLS and credential options. The shared dev broker is plain and anonymous.
import { execFileSync, spawn } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { createServer, connect, type AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pollUntil } from '../env.js';

export interface PrivateBroker {
  url: string;
  dir: string;
  caFile: string;
  /** A CA the broker's certificate is not signed by. */
  otherCaFile: string;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

function ossl(dir: string, args: string[]): void {
  execFileSync('openssl', args, { cwd: dir, stdio: 'ignore' });
}

export async function startTlsBroker(user: string, password: string): Promise<PrivateBroker> {
  const dir = mkdtempSync(join(tmpdir(), 'reefd-mosq-'));
  const subj = (cn: string): string[] => ['-subj', `/CN=${cn}`];
  ossl(dir, [
    'req',
    '-x509',
    '-newkey',
    'rsa:2048',
    '-nodes',
    '-keyout',
    'ca.key',
    '-out',
    'ca.crt',
    '-days',
    '2',
    ...subj('reefd test CA'),
  ]);
  ossl(dir, [
    'req',
    '-x509',
    '-newkey',
    'rsa:2048',
    '-nodes',
    '-keyout',
    'other.key',
    '-out',
    'other.crt',
    '-days',
    '2',
    ...subj('other CA'),
  ]);
  ossl(dir, [
    'req',
    '-newkey',
    'rsa:2048',
    '-nodes',
    '-keyout',
    'srv.key',
    '-out',
    'srv.csr',
    ...subj('127.0.0.1'),
  ]);
  writeFileSync(join(dir, 'ext.cnf'), 'subjectAltName=IP:127.0.0.1\n');
  ossl(dir, [
    'x509',
    '-req',
    '-in',
    'srv.csr',
    '-CA',
    'ca.crt',
    '-CAkey',
    'ca.key',
    '-CAcreateserial',
    '-out',
    'srv.crt',
    '-days',
    '2',
    '-extfile',
    'ext.cnf',
  ]);
  execFileSync('mosquitto_passwd', ['-c', '-b', join(dir, 'passwd'), user, password], { stdio: 'ignore' });
  const port = await freePort();
  // `user root`: started as root, Mosquitto would otherwise drop to its own user and not read this folder.
  const conf = [
    'per_listener_settings false',
    'user root',
    'persistence false',
    'allow_anonymous false',
    `password_file ${join(dir, 'passwd')}`,
    `listener ${port} 127.0.0.1`,
    `cafile ${join(dir, 'ca.crt')}`,
    `certfile ${join(dir, 'srv.crt')}`,
    `keyfile ${join(dir, 'srv.key')}`,
    '',
  ].join('\n');
  writeFileSync(join(dir, 'mosquitto.conf'), conf);
  const child = spawn('mosquitto', ['-c', join(dir, 'mosquitto.conf')], { stdio: 'ignore' });
  await pollUntil(
    'private Mosquitto listening',
    () =>
      new Promise<true | undefined>((resolve) => {
        const s = connect(port, '127.0.0.1');
        s.once('connect', () => {
          s.destroy();
          resolve(true);
        });
        s.once('error', () => resolve(undefined));
      }),
    10_000,
    100,
  );
  return {
    url: `mqtts://127.0.0.1:${port}`,
    dir,
    caFile: join(dir, 'ca.crt'),
    otherCaFile: join(dir, 'other.crt'),
    stop: async () => {
      const exited = new Promise<void>((r) => child.once('exit', () => r()));
      child.kill('SIGTERM');
      await exited;
      await rm(dir, { recursive: true, force: true });
    },
  };
}
