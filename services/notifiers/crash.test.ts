import { describe, it, expect } from 'vitest';
import { spawn } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { loadOutboxState } from './index.js';
import { alert, tempDir } from './test-helpers.js';

const here = dirname(fileURLToPath(import.meta.url));

describe('outbox durability under kill -9', () => {
  it('keeps every alert whose enqueue() had resolved when the process was killed', async () => {
    const dir = await tempDir();
    // node itself with the tsx loader (not the tsx wrapper, whose SIGKILL would leave its node child running).
    const child = spawn(process.execPath, ['--import', 'tsx', join(here, 'crash-child.ts'), dir], {
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    let confirmed = -1;
    let buf = '';
    await new Promise<void>((resolve, reject) => {
      child.on('error', reject);
      child.on('exit', (code) =>
        confirmed < 0 ? reject(new Error(`child exited early (${code})`)) : undefined,
      );
      child.stdout.on('data', (d: Buffer) => {
        buf += d.toString('utf8');
        const lines = buf.split('\n');
        buf = lines.pop() ?? '';
        for (const l of lines) confirmed = Math.max(confirmed, Number(l));
        if (confirmed >= 40) {
          child.kill('SIGKILL');
          child.stdout.removeAllListeners('data');
          resolve();
        }
      });
    });
    if (child.exitCode === null && child.signalCode === null) await new Promise((r) => child.once('exit', r));
    expect(child.signalCode).toBe('SIGKILL');
    const { state } = await loadOutboxState(dir);
    const missing: number[] = [];
    for (let i = 0; i <= confirmed; i++) {
      const id = alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: `s${i}` }).id;
      if (!state.episodes.has(id)) missing.push(i);
    }
    expect({ confirmed, missing }).toEqual({ confirmed, missing: [] });
    expect(state.items.size).toBeGreaterThanOrEqual(confirmed + 1);
  }, 30_000);
});
