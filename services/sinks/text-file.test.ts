// The append-only text file of the NDJSON and dead-letter outputs on a full disk: a write cut short leaves
// no half line, the text waits and is written once space returns, in order.
import { mkdtemp, open, readFile, rm, type FileHandle } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { ReefdError } from '../../libs/contract/index.js';
import { TextFile } from './text-file.js';

const dirs: string[] = [];
afterEach(async () => {
  for (const d of dirs.splice(0)) await rm(d, { recursive: true, force: true });
});

/** A real file handle whose writes reach the disk by half, then fail with ENOSPC, while `disk.full`. */
function fillable(fh: FileHandle, disk: { full: boolean }): FileHandle {
  return new Proxy(fh, {
    get(target, prop) {
      if (prop === 'write')
        return async (buf: Buffer, off = 0) => {
          if (!disk.full) return target.write(buf, off);
          await target.write(buf.subarray(off, off + Math.ceil((buf.length - off) / 2)));
          throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
        };
      const v = Reflect.get(target, prop, target) as unknown;
      return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v;
    },
  });
}

describe('text file on a full disk', () => {
  it('cuts a half-written line, holds the text and writes it, in order, once space returns', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-textfile-'));
    dirs.push(dir);
    const path = join(dir, 'out.ndjson');
    const disk = { full: false };
    const f = new TextFile(fillable(await open(path, 'a'), disk));
    f.write('{"a":1}\n');
    await f.flush();
    disk.full = true;
    f.write('{"b":2}\n');
    f.write('{"c":3}\n');
    const err = await f.flush().catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ReefdError);
    expect([(err as ReefdError).code, (err as ReefdError).retriable]).toEqual(['REEFD_DISK_FULL', true]);
    expect(await readFile(path, 'utf8')).toBe('{"a":1}\n');
    disk.full = false;
    f.write('{"d":4}\n');
    await f.close();
    expect(await readFile(path, 'utf8')).toBe('{"a":1}\n{"b":2}\n{"c":3}\n{"d":4}\n');
  });
});
