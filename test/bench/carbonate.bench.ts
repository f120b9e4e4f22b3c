// Benchmark: carbonate solves per second (TA + pCO2, one core) against PyCO2SYS 1.8.3.4 on the same grid,
// measured in the same run (issue 3 goal: >= 20x PyCO2SYS and > 1e6 solves/s).
// Run: npx tsx test/bench/carbonate.bench.ts [N] (or npm run bench carbonate). Needs the reference venv
// for the baseline (REEFD_VENV_PYTHON, default .cache/venv/bin/python); without it only our rates print.
// Rates are given by wall clock and by this process's CPU time: on a shared 2-core machine the CPU-time
// figure is the one-core rate; the ratio is taken on like terms (PyCO2SYS's process time likewise).

import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import {
  carbonateUncertainty,
  createConstants,
  equilibriumConstantsInto,
  resolveCarbonateOptions,
  solveCarbonate,
  solveTaDicInto,
  solveTaPco2Into,
  STATE,
  STATE_LENGTH,
} from '../../libs/carbonate/index.js';
import { bytesPerCall, cpuMicros } from './lib/measure.js';
import { referenceUncertainty } from './lib/uncertainty-before.js';

const n = Number(process.argv[2] ?? 200_000);
// Deterministic grid, identical to carbonate_pyco2sys_timing.py.
const temp = new Float64Array(n);
const sal = new Float64Array(n);
const ta = new Float64Array(n);
const pco2 = new Float64Array(n);
for (let i = 0; i < n; i++) {
  temp[i] = 15 + (20 * ((i * 7919) % 1000)) / 999;
  sal[i] = 30 + (10 * ((i * 104729) % 1000)) / 999;
  ta[i] = 1800 + (800 * ((i * 1299709) % 1000)) / 999;
  pco2[i] = 150 + (1850 * ((i * 15485863) % 1000)) / 999;
}
const opts = resolveCarbonateOptions({ fugacity: 'weiss1974-dilute', kw: 'millero1995-sws' });
const state = new Float64Array(STATE_LENGTH);
const c = createConstants();

interface Rate {
  wall: number;
  cpu: number;
}

/** Best of 3 after a warm-up; rates by wall clock and by this process's CPU time (the machine is shared). */
function best(label: string, fn: () => number): Rate {
  fn(); // warm-up (JIT)
  let bestWall = Infinity;
  let bestCpu = Infinity;
  let sink = 0;
  for (let r = 0; r < 3; r++) {
    const u0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    sink += fn();
    const wall = Number(process.hrtime.bigint() - t0) / 1e9;
    const u = process.cpuUsage(u0);
    const cpu = (u.user + u.system) / 1e6;
    if (wall < bestWall) bestWall = wall;
    if (cpu < bestCpu) bestCpu = cpu;
  }
  const rate = { wall: n / bestWall, cpu: n / bestCpu };
  console.log(`${label.padEnd(52)} ${fmt(rate)}  (mean pH ${(sink / 3).toFixed(4)})`);
  return rate;
}

function fmt(r: Rate): string {
  return `${(r.wall / 1e6).toFixed(3)} M/s wall, ${(r.cpu / 1e6).toFixed(3)} M/s CPU`;
}

// 1. Constants for each sample's own (S, t), then the solve: what a pipeline pays per pCO2 reading
// (no nutrients, so the phosphate/silicate constants are skipped).
const withConstants = best('constants + TA,pCO2 solve (solveTaPco2Into)', () => {
  let sum = 0;
  for (let i = 0; i < n; i++) {
    equilibriumConstantsInto(c, sal[i]!, temp[i]!, 0, opts, false);
    solveTaPco2Into(c, ta[i]!, pco2[i]!, state);
    sum += state[STATE.ph]!;
  }
  return sum / n;
});

// 2. Solve only, constants fixed (the metabolism inverse iterates at fixed S, t, P), warm start off.
equilibriumConstantsInto(c, 35, 27, 0, opts);
const solveOnly = best('solve only, fixed constants (solveTaPco2Into)', () => {
  let sum = 0;
  for (let i = 0; i < n; i++) {
    solveTaPco2Into(c, ta[i]!, pco2[i]!, state);
    sum += state[STATE.ph]!;
  }
  return sum / n;
});

// 2b. TA + DIC at fixed constants (the output-conditions step and the Revelle-free re-solve).
const dicGrid = new Float64Array(n);
for (let i = 0; i < n; i++) dicGrid[i] = ta[i]! * (0.8 + (0.15 * ((i * 7919) % 997)) / 996);
best('solve only, TA + DIC (solveTaDicInto)', () => {
  let sum = 0;
  for (let i = 0; i < n; i++) {
    solveTaDicInto(c, ta[i]!, dicGrid[i]!, state);
    sum += state[STATE.ph]!;
  }
  return sum / n;
});

// 3. The convenience API with object input and result (allocates, validates, notes).
const api = best('solveCarbonate (object API, constants each call)', () => {
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const r = solveCarbonate(
      { salinity: sal[i]!, tempC: temp[i]!, taUmolKg: ta[i]!, pco2Uatm: pco2[i]! },
      opts,
    );
    if (r.ok) sum += r.phTotal;
  }
  return sum / n;
});

const repo = fileURLToPath(new URL('../..', import.meta.url));
const python = process.env.REEFD_VENV_PYTHON ?? path.join(repo, '.cache/venv/bin/python');
const script = fileURLToPath(new URL('./carbonate_pyco2sys_timing.py', import.meta.url));
if (!existsSync(python)) {
  console.log(
    `PyCO2SYS baseline skipped: ${python} not found (deploy/dev/venv.sh makes it, or set REEFD_VENV_PYTHON)`,
  );
} else {
  // One thread for the baseline too (numpy's elementwise work is single-threaded; BLAS is pinned anyway).
  const env = { ...process.env, OMP_NUM_THREADS: '1', OPENBLAS_NUM_THREADS: '1', MKL_NUM_THREADS: '1' };
  const out = spawnSync(python, [script, String(n)], { encoding: 'utf8', env });
  if (out.status !== 0) {
    console.log(`PyCO2SYS baseline failed: ${out.stderr.trim().split('\n').pop() ?? ''}`);
  } else {
    const parsed = JSON.parse(out.stdout.trim().split('\n').pop()!) as {
      rate: number;
      cpu_rate: number;
      check_ph0: number;
    };
    const base: Rate = { wall: parsed.rate, cpu: parsed.cpu_rate };
    equilibriumConstantsInto(c, sal[0]!, temp[0]!, 0, opts);
    solveTaPco2Into(c, ta[0]!, pco2[0]!, state);
    console.log(`${'PyCO2SYS 1.8.3.4, one vectorised sys() call'.padEnd(52)} ${fmt(base)}`);
    console.log(
      `same answer, first case: |dpH| = ${Math.abs(state[STATE.ph]! - parsed.check_ph0).toExponential(2)}`,
    );
    const ratio = (a: Rate): string =>
      `${(a.wall / base.wall).toFixed(1)}x wall, ${(a.cpu / base.cpu).toFixed(1)}x CPU`;
    console.log(`ratio constants+solve / PyCO2SYS: ${ratio(withConstants)} (goal >= 20x)`);
    console.log(`ratio solve only / PyCO2SYS:      ${ratio(solveOnly)}`);
    console.log(`ratio solveCarbonate / PyCO2SYS:  ${ratio(api)}`);
  }
}
console.log(
  `goal > 1e6 solves/s per core (CPU time): constants + solve ${withConstants.cpu > 1e6 ? 'met' : 'NOT met'}, ` +
    `solve only ${solveOnly.cpu > 1e6 ? 'met' : 'NOT met'}`,
);

// 4. Uncertainty propagation per pCO2 reading, as the processor asks for it (TA + pCO2 with a separate output
// temperature, its sigmas and the constants' defaults): the former propagation (constants recomputed for
// every perturbed solve; test/bench/lib/uncertainty-before.ts) against the current one, interleaved, in CPU
// time, and the heap bytes each allocates per call. The two give identical numbers (uncertainty.test.ts).
{
  const cases = Array.from({ length: 64 }, (_, i) => ({
    salinity: sal[i]!,
    tempC: temp[i]!,
    outTempC: temp[i]! + 0.2,
    taUmolKg: ta[i]!,
    pco2Uatm: pco2[i]!,
    baroHpa: 1011,
  }));
  const sig = { pco2Uatm: 4, taUmolKg: 10, tempC: 0.05, salinity: 0.05 };
  let j = 0;
  const next = () => cases[j++ % cases.length]!;
  const [before, after, lean] = cpuMicros([
    {
      label: 'carbonateUncertainty, before (recomputed constants)',
      iter: 400,
      fn: () => referenceUncertainty(next(), sig),
    },
    { label: 'carbonateUncertainty, after', iter: 400, fn: () => carbonateUncertainty(next(), sig) },
    {
      label: "carbonateUncertainty, after, detail 'sigma'",
      iter: 400,
      fn: () => carbonateUncertainty(next(), sig, undefined, 'sigma'),
    },
  ]) as [number, number, number];
  const bBefore = bytesPerCall((i) => referenceUncertainty(cases[i % 64]!, sig), 50);
  const bAfter = bytesPerCall((i) => carbonateUncertainty(cases[i % 64]!, sig), 50);
  const bLean = bytesPerCall((i) => carbonateUncertainty(cases[i % 64]!, sig, undefined, 'sigma'), 50);
  console.log(
    `uncertainty per pCO2 reading: ${(before / after).toFixed(2)}x faster (${before.toFixed(1)} -> ${after.toFixed(1)} us; ` +
      `sigma only ${lean.toFixed(1)} us); heap bytes per call ${Math.round(bBefore)} -> ${Math.round(bAfter)} (sigma only ${Math.round(bLean)})`,
  );
}
