// Crash test of the raw archive writer: a child process appends at full speed and is killed with SIGKILL.
// Every append that resolved must be in the archive; at most the last line is cut short, the reader skips
// it, and a new writer continues on a fresh line.
import { describe, it, expect } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { archiveLine } from '../../../libs/contract/index.js';
import { createArchiveWriter, readArchive } from '../../../services/archive/index.js';

const child = fileURLToPath(new URL('./archive-crash-child.ts', import.meta.url));

describe('raw archive under kill -9', () => {
  it('keeps every acknowledged line and recovers the file', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-crash-'));
    const proc = spawn(process.execPath, ['--import', 'tsx', child, dir], {
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    const acked = new Set<number>();
    let buf = '';
    await new Promise<void>((resolve, reject) => {
      proc.on('error', reject);
      proc.stdout.on('data', (c: Buffer) => {
        buf += c.toString();
        const parts = buf.split('\n');
        buf = parts.pop() ?? '';
        for (const p of parts) acked.add(Number(p));
        if (acked.size >= 3000) {
          proc.kill('SIGKILL');
          resolve();
        }
      });
    });
    await new Promise((r) => proc.once('exit', r));
    const seen = new Set<number>();
    const errors: { lineNo: number; error: string }[] = [];
    let lines = 0;
    for await (const e of readArchive(dir)) {
      lines++;
      if (e.line !== null) seen.add((e.line.msg as { seq: number }).seq);
      else errors.push({ lineNo: e.lineNo, error: e.error ?? '' });
    }
    const missing = [...acked].filter((s) => !seen.has(s));
    expect(missing).toEqual([]);
    // Only a cut-short last line may fail to parse.
    expect(errors.length).toBeLessThanOrEqual(1);
    if (errors.length === 1) expect(errors[0]?.lineNo).toBe(lines);

    // A new writer starts on a fresh line: its line reads back whole.
    const now = Date.now();
    const w = await createArchiveWriter({ dir, fsyncMs: 0, retentionDays: 0, clock: () => now });
    await w.append(archiveLine('reef/s/st/ctd/c1', new Date(now).toISOString(), '{"v":1,"seq":-1}'), now);
    await w.close();
    let last: unknown;
    for await (const e of readArchive(dir)) if (e.line !== null) last = e.line.msg;
    expect(last).toEqual({ v: 1, seq: -1 });
    await rm(dir, { recursive: true, force: true });
  });
});
