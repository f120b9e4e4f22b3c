import { Writable } from 'node:stream';
import { pino } from 'pino';
import { describe, expect, it } from 'vitest';
import { ReefdError } from '../../libs/contract/index.js';
import { errFields } from './logger.js';

function capture(): { logger: pino.Logger; lines: Record<string, unknown>[] } {
  const lines: Record<string, unknown>[] = [];
  const sink = new Writable({
    write(chunk: Buffer, _enc, cb) {
      lines.push(JSON.parse(chunk.toString('utf8')) as Record<string, unknown>);
      cb();
    },
  });
  return { logger: pino({ level: 'info' }, sink), lines };
}

describe('errFields', () => {
  it('puts the error (message and stack) and its stable code on the log line', () => {
    const { logger, lines } = capture();
    const err = new ReefdError('REEFD_DISK_FULL', 'REEFD_DISK_FULL: /data is full', { retriable: true });
    logger.error({ ...errFields(err), sink: 'db' }, 'flush failed');
    const line = lines[0] as {
      code: string;
      sink: string;
      err: { message: string; stack: string; type: string };
    };
    expect(line.code).toBe('REEFD_DISK_FULL');
    expect(line.sink).toBe('db');
    expect(line.err.message).toBe('REEFD_DISK_FULL: /data is full');
    expect(line.err.type).toBe('ReefdError');
    expect(line.err.stack).toMatch(/logger\.test\.ts/);
  });

  it('takes a system error code, and leaves code out when the error has none', () => {
    expect(errFields(Object.assign(new Error('no space'), { code: 'ENOSPC' })).code).toBe('ENOSPC');
    const plain = errFields(new Error('plain'));
    expect('code' in plain).toBe(false);
    expect(errFields('a string')).toEqual({ err: 'a string' });
  });
});
