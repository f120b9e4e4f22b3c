// `reefd doctor`: each check reports ok or what to fix, against real loopback listeners and closed ports.
import { mkdtemp, writeFile } from 'node:fs/promises';
import http from 'node:http';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { captureIo } from '../testing.js';
import { run } from './doctor.js';

let dir: string;
let tcp: net.Server;
let web: http.Server;
let tcpPort: number;
let webPort: number;

const listen = (s: net.Server) =>
  new Promise<number>((r) => s.listen(0, '127.0.0.1', () => r((s.address() as net.AddressInfo).port)));

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'reefd-doctor-'));
  tcp = net.createServer((c) => c.end());
  web = http.createServer((_q, res) => res.writeHead(204).end());
  tcpPort = await listen(tcp);
  webPort = await listen(web);
});
afterAll(() => {
  tcp.close();
  web.close();
});

async function config(body: string): Promise<string> {
  const f = path.join(dir, `c-${Math.random().toString(36).slice(2)}.yaml`);
  await writeFile(f, `site: s\nreef_axis_deg: 270\nstations: {}\ndata_dir: ${dir}/data\n${body}`);
  return f;
}

describe('reefd doctor', () => {
  it('passes the reachable services and names what is missing', async () => {
    // A port that was just free: bind, read, close.
    const probe = net.createServer();
    const closed = await listen(probe);
    await new Promise<void>((r) => probe.close(() => r()));
    const f = await config(
      `sources:\n  mqtt: { url: "mqtt://127.0.0.1:${tcpPort}" }\noutputs:\n  influx: { url: "http://127.0.0.1:${webPort}", api: v1, token: { env: REEFD_T } }\n  kafka: { brokers: ["127.0.0.1:${closed}"] }\n`,
    );
    const io = captureIo({});
    const code = await run(['--config', f, '--timeout-ms', '1000'], io);
    const out = io.text().stdout;
    expect(out).toMatch(/^ok {4}config: /m);
    expect(out).toMatch(/^ok {4}mqtt broker: 127\.0\.0\.1:\d+ reachable/m);
    expect(out).toMatch(/^ok {4}database: .*\/ping answers/m);
    expect(out).toMatch(/^FAIL {2}kafka 127\.0\.0\.1:\d+: .*start Kafka/m);
    expect(out).toMatch(/^FAIL {2}secret outputs\.influx\.token: environment variable REEFD_T is not set/m);
    expect(code).toBe(1);
  });

  it('fails an invalid configuration with its problems', async () => {
    const f = path.join(dir, 'bad.yaml');
    await writeFile(f, 'site: "bad site"\nreef_axis_deg: 270\nstations: {}\n');
    const io = captureIo();
    expect(await run(['--config', f], io)).toBe(1);
    expect(io.text().stdout).toContain('site: ');
  });

  it('needs --config', async () => {
    expect(await run([], captureIo())).toBe(2);
  });

  it('fails a configuration without sources (reefd run would refuse it) and an unwritable NDJSON folder', async () => {
    const f = await config('outputs:\n  ndjson: { path: /proc/reefd-no/records.ndjson }\n');
    const io = captureIo({});
    const code = await run(['--config', f, '--timeout-ms', '500'], io);
    const out = io.text().stdout;
    expect(out).toMatch(/^FAIL {2}sources: none configured: reefd run refuses to start \(REEFD_NO_SOURCE\)/m);
    expect(out).toMatch(/^FAIL {2}ndjson output: \/proc\/reefd-no: /m);
    expect(code).toBe(1);
  });
});
