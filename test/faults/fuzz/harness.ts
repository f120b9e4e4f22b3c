// Fuzzing harness: fast-check with the run count and seed from the environment, and every counterexample
// kept as a regression fixture under test/fixtures/fuzz/<target>/ that regressions.test.ts replays.
//   REEFD_FUZZ_RUNS=200000 REEFD_FUZZ_SEED=42 npm run test:faults
import { createHash } from 'node:crypto';
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { REPO } from '../helpers/daemon.js';

export const FIXTURES = join(REPO, 'test/fixtures/fuzz');

/** Runs per property: REEFD_FUZZ_RUNS (default 400, a quick CI pass). */
export function fuzzRuns(defaultRuns = 400): number {
  const v = Number(process.env.REEFD_FUZZ_RUNS);
  return Number.isInteger(v) && v > 0 ? v : defaultRuns;
}

/** REEFD_FUZZ_SEED when set (reproducible long runs), otherwise fast-check's own random seed. */
export function fuzzSeed(): number | undefined {
  const v = Number(process.env.REEFD_FUZZ_SEED);
  return process.env.REEFD_FUZZ_SEED !== undefined && Number.isInteger(v) ? v : undefined;
}

/** Long runs need a longer per-test timeout than the suite's 240 s. */
export function fuzzTimeoutMs(): number {
  return Math.max(60_000, fuzzRuns() * 20);
}

export interface Fixture<T> {
  target: string;
  note: string;
  input: T;
}

/** Every fixture of a target (JSON files), in name order. */
export function fixtures<T>(target: string): { file: string; fixture: Fixture<T> }[] {
  const dir = join(FIXTURES, target);
  let names: string[] = [];
  try {
    names = readdirSync(dir).filter((n) => n.endsWith('.json'));
  } catch {
    return [];
  }
  return names
    .sort()
    .map((n) => ({ file: n, fixture: JSON.parse(readFileSync(join(dir, n), 'utf8')) as Fixture<T> }));
}

/**
 * Checks `property` over `arb`; on a counterexample, writes it to test/fixtures/fuzz/<target>/<hash>.json
 * (so the regression test replays it from now on) and fails with the seed and path to reproduce.
 */
export function fuzz<T>(target: string, arb: fc.Arbitrary<T>, property: (input: T) => void): void {
  const seed = fuzzSeed();
  const result = fc.check(
    fc.property(arb, (input) => {
      property(input);
    }),
    { numRuns: fuzzRuns(), ...(seed !== undefined ? { seed } : {}) },
  );
  keep(target, result);
}

/** The same for an async property (file readers); `runsDivisor` scales the run count down for slow ones. */
export async function fuzzAsync<T>(
  target: string,
  arb: fc.Arbitrary<T>,
  property: (input: T) => Promise<void>,
  runsDivisor = 1,
): Promise<void> {
  const seed = fuzzSeed();
  const result = await fc.check(
    fc.asyncProperty(arb, async (input) => {
      await property(input);
    }),
    { numRuns: Math.max(1, Math.round(fuzzRuns() / runsDivisor)), ...(seed !== undefined ? { seed } : {}) },
  );
  keep(target, result);
}

function keep<T>(target: string, result: fc.RunDetails<[T]>): void {
  if (!result.failed) return;
  const input = result.counterexample?.[0] as T;
  const text = JSON.stringify(input);
  const hash = createHash('sha256').update(text).digest('hex').slice(0, 12);
  const dir = join(FIXTURES, target);
  mkdirSync(dir, { recursive: true });
  const file = join(dir, `crash-${hash}.json`);
  const err = result.errorInstance as Error | undefined;
  const fixture: Fixture<T> = {
    target,
    note: `found by fuzzing (seed ${result.seed}): ${err?.message.split('\n')[0] ?? 'failed'}`,
    input,
  };
  writeFileSync(file, JSON.stringify(fixture, null, 2) + '\n');
  throw new Error(
    `REEFD_FUZZ_COUNTEREXAMPLE: ${target} failed (seed ${result.seed}, path ${result.counterexamplePath ?? ''}); ` +
      `kept as ${file}: ${err?.message ?? ''}`,
  );
}
