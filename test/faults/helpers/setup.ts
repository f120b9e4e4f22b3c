// Per-case bookkeeping: unique names, a data folder, and cleanups run in reverse order after the case.
import { mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomSuffix } from '../../integration/env.js';

export interface CaseEnv {
  id: string;
  prefix: string;
  site: string;
  dataDir: string;
  archiveDir: string;
  defer(fn: () => Promise<unknown>): void;
  cleanup(): Promise<void>;
}

export function caseEnv(letter: string): CaseEnv {
  const id = randomSuffix();
  const dataDir = mkdtempSync(join(tmpdir(), `reefd-faults-${letter}-`));
  const fns: (() => Promise<unknown>)[] = [() => rm(dataDir, { recursive: true, force: true })];
  return {
    id,
    prefix: `f${letter}-${id}`,
    site: `f${letter}${id}`,
    dataDir,
    archiveDir: join(dataDir, 'archive'),
    defer: (fn) => fns.push(fn),
    cleanup: async () => {
      for (const fn of fns.reverse()) await fn().catch(() => undefined);
    },
  };
}

/** True when `xs` never decreases. */
export function nonDecreasing(xs: readonly number[]): boolean {
  for (let i = 1; i < xs.length; i++) if ((xs[i] as number) < (xs[i - 1] as number)) return false;
  return true;
}
