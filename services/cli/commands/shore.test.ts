// `reefd shore` refuses unusable arguments before it touches Kafka (the member itself is tested against a real
// broker in test/integration/scaleout).
import { describe, expect, it } from 'vitest';
import { captureIo } from '../testing.js';
import { parseHostPort, run } from './shore.js';

describe('reefd shore arguments', () => {
  it('names every missing argument and exits 2', async () => {
    const io = captureIo();
    expect(await run([], io)).toBe(2);
    const err = io.text().stderr;
    for (const w of ['--brokers', '--topic', '--group', '--site', '--state-topic and --state-dir'])
      expect(err).toContain(w);
  });
  it('wants exactly one state store', async () => {
    const io = captureIo();
    const base = [
      '--brokers',
      '127.0.0.1:1',
      '--topic',
      't',
      '--group',
      'g',
      '--site',
      'deploy/demo/ornen-reef.yaml',
    ];
    expect(await run([...base, '--state-dir', '/tmp/x', '--state-topic', 't.state'], io)).toBe(2);
    expect(io.text().stderr).toContain('exactly one of --state-topic and --state-dir');
  });
  it('exits 2 for a site file that does not validate', async () => {
    const io = captureIo();
    const args = ['--brokers', '127.0.0.1:1', '--topic', 't', '--group', 'g', '--state-dir', '/tmp/x'];
    expect(await run([...args, '--site', 'test/fixtures/config/invalid.yaml'], io)).toBe(2);
    expect(io.text().stderr).toContain('problem');
  });
});

describe('reefd shore --http', () => {
  it('takes PORT or HOST:PORT, loopback by default', () => {
    expect(parseHostPort('9464')).toEqual({ host: '127.0.0.1', port: 9464 });
    expect(parseHostPort('0.0.0.0:9464')).toEqual({ host: '0.0.0.0', port: 9464 });
    expect(parseHostPort('[::1]:0')).toEqual({ host: '::1', port: 0 });
    expect(parseHostPort('70000')).toBeNull();
    expect(parseHostPort('metrics')).toBeNull();
    expect(parseHostPort('host:')).toBeNull();
  });
  it('refuses an address it cannot read before anything starts', async () => {
    const io = captureIo();
    const args = ['--brokers', '127.0.0.1:1', '--topic', 't', '--group', 'g', '--state-dir', '/tmp/x'];
    expect(await run([...args, '--site', 'deploy/demo/ornen-reef.yaml', '--http', 'ninety'], io)).toBe(2);
    expect(io.text().stderr).toContain('--http takes PORT or HOST:PORT');
  });
});
