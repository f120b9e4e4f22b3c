// Fault (h): SIGTERM during a heavy replay (`reefd replay` of a four-day archive of the fictional demo
// reef). The command exits promptly, its output holds only complete lines, and the summary says interrupted.
import { spawn } from 'node:child_process';
import { createWriteStream } from 'node:fs';
import { mkdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadConfigOrThrow } from '../../services/config/load.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { summary as printSummary, sleep, waitFor } from './helpers/count.js';
import { BIN, REPO } from './helpers/daemon.js';
import { caseEnv } from './helpers/setup.js';

const env = caseEnv('h');
afterAll(() => env.cleanup());

const DEMO = join(REPO, 'deploy/demo/ornen-reef.yaml');
const COPIES = 8; // 8 x 12 h

/** 12 simulated hours, written COPIES times shifted by 12 h each: one archive file per UTC day. */
async function writeArchive(dir: string): Promise<number> {
  const cfg = await loadConfigOrThrow(DEMO);
  const startMs = Date.UTC(2026, 10, 1);
  const half = 12 * 3600_000;
  const sim = simulateMessages(cfg, { startMs, durationMs: half, seed: 3 });
  await mkdir(dir, { recursive: true });
  let lines = 0;
  const files = new Map<string, ReturnType<typeof createWriteStream>>();
  for (let c = 0; c < COPIES; c++) {
    for (const m of sim.messages) {
      const p = { ...m.payload, t: new Date(Date.parse(String(m.payload.t)) + c * half).toISOString() };
      const rxMs = m.tMs + c * half + 500;
      const day = new Date(rxMs).toISOString().slice(0, 10);
      let f = files.get(day);
      if (!f) {
        f = createWriteStream(join(dir, `raw-${day}.ndjson`));
        files.set(day, f);
      }
      f.write(`${JSON.stringify({ topic: m.topic, rx: new Date(rxMs).toISOString(), msg: p })}\n`);
      lines++;
    }
  }
  await Promise.all([...files.values()].map((f) => new Promise<void>((r) => f.end(() => r()))));
  return lines;
}

describe('fault h: SIGTERM during a heavy replay', () => {
  it('exits promptly with complete lines and an interrupted summary', async () => {
    const archive = join(env.dataDir, 'archive');
    const total = await writeArchive(archive);
    const outFile = join(env.dataDir, 'out.ndjson');
    const sumFile = join(env.dataDir, 'summary.json');
    const child = spawn(
      process.execPath,
      [
        BIN,
        'replay',
        '--config',
        DEMO,
        '--input',
        archive,
        '--out',
        outFile,
        '--summary-json',
        sumFile,
        '--quiet',
      ],
      { cwd: REPO, stdio: ['ignore', 'ignore', 'pipe'] },
    );
    let stderr = '';
    child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((r) =>
      child.once('exit', (code, signal) => r({ code, signal })),
    );
    env.defer(async () => {
      child.kill('SIGKILL');
      await exited;
    });
    // Wait until it has produced output for a while, then stop it mid-replay.
    await waitFor(async () => (await readFile(outFile, 'utf8').catch(() => '')).length > 20_000, 20_000, 50);
    await sleep(1000);
    const sentAt = Date.now();
    child.kill('SIGTERM');
    const ex = await exited;
    const exitMs = Date.now() - sentAt;
    const text = await readFile(outFile, 'utf8');
    const lines = text.split('\n');
    const last = lines.pop();
    let parsed = 0;
    let broken = 0;
    for (const l of lines) {
      try {
        JSON.parse(l);
        parsed++;
      } catch {
        broken++;
      }
    }
    const s = JSON.parse(await readFile(sumFile, 'utf8')) as {
      lines: number;
      records: number;
      interrupted: boolean;
    };
    printSummary('h (SIGTERM during replay)', {
      'archive lines': total,
      'lines read': s.lines,
      'records in summary': s.records,
      'complete output lines': parsed,
      'broken lines': broken,
      'trailing partial': last === '' ? 0 : 1,
      interrupted: String(s.interrupted),
      'exit code': String(ex.code),
      'exit ms after SIGTERM': exitMs,
    });
    expect(stderr).not.toContain('Error');
    // An interrupted replay is incomplete: exit 1 (services/cli/commands/replay.ts), never killed by the signal.
    expect(ex.signal).toBeNull();
    expect(ex.code).toBe(1);
    expect(exitMs).toBeLessThan(3000);
    expect(s.interrupted).toBe(true);
    expect(s.lines).toBeLessThan(total);
    expect(broken).toBe(0);
    expect(last).toBe('');
    expect(parsed).toBe(s.records);
  });
});
