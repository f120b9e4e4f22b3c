// Benchmark: transect flux updates per second for 100 transects; one update = the O2 budget + the inverse NEC
// (pCO2 + O2, Brent on the carbonate system) of one 30 min window. Baseline measured in the same run: one
// carbonate solve (TA + pCO2, the public solveCarbonate). Printed as rates and as ratios to the baseline.
// Run: npx tsx test/bench/metabolism.bench.ts
import { solveCarbonate } from '../../libs/carbonate/index.js';
import {
  computeTransectFlux,
  forwardDownstream,
  makeTransectParams,
  type FluxResult,
  type TransectWindow,
} from '../../libs/metabolism/index.js';

const N_TRANSECTS = 100;

/** Deterministic generator (LCG, Numerical Recipes constants) so every run sees the same windows. */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

function makeWindows(): { windows: TransectWindow[]; lengths: number[] } {
  const rnd = lcg(12345);
  const windows: TransectWindow[] = [];
  const lengths: number[] = [];
  for (let i = 0; i < N_TRANSECTS; i++) {
    const tempC = 25 + 4 * rnd();
    const salinity = 34.5 + rnd();
    const ta = (2300 * salinity) / 35;
    const c = solveCarbonate({ salinity, tempC, taUmolKg: ta, pco2Uatm: 380 + 60 * rnd() });
    if (!c.ok) throw new Error(c.reason);
    const u = 0.03 + 0.1 * rnd();
    const h = 0.6 + 1.5 * rnd();
    const L = 200 + 400 * rnd();
    const o2Up = 190 + 20 * rnd();
    const f = forwardDownstream({
      up: { tempC, salinity, o2UmolKg: o2Up, taUmolKg: ta, dicUmolKg: c.dicUmolKg },
      ncpMmolM2H: -8 + 35 * rnd(),
      necMmolM2H: 1 + 8 * rnd(),
      pq: 1,
      uMS: u,
      depthM: h,
      lengthM: L,
    });
    if (!f.ok) throw new Error(f.reason);
    const st = (o2: number, pco2: number) => ({
      tempC,
      salinity,
      o2UmolKg: o2,
      pco2Uatm: pco2,
      taUmolKg: ta,
      taSource: 'salinity' as const,
      depthM: h,
      flag: 1 as const,
    });
    windows.push({
      tCentreMs: Date.UTC(2026, 0, 1, 12),
      up: st(o2Up, f.upPco2Uatm),
      down: st(f.o2UmolKg, f.pco2Uatm),
      eastMS: -u,
      northMS: 0,
      windMS: 6,
      windHeightM: 10,
      baroHpa: 1012,
      xco2AirPpm: 420,
    });
    lengths.push(L);
  }
  return { windows, lengths };
}

function timeIt(label: string, minMs: number, body: () => number): number {
  // Warm up, then repeat until minMs has passed; returns operations per second.
  let ops = 0;
  for (let i = 0; i < 3; i++) ops += body();
  ops = 0;
  const t0 = process.hrtime.bigint();
  let elapsed = 0;
  while (elapsed < minMs) {
    ops += body();
    elapsed = Number(process.hrtime.bigint() - t0) / 1e6;
  }
  const rate = (ops / elapsed) * 1000;
  console.log(`${label.padEnd(58)} ${rate.toFixed(0).padStart(10)} /s`);
  return rate;
}

const { windows, lengths } = makeWindows();
const params = windows.map((_, i) => makeTransectParams({ lengthM: lengths[i] as number, bearingDeg: 270 }));
let sink = 0;

const solveRate = timeIt('baseline: solveCarbonate (TA + pCO2)', 1500, () => {
  for (const w of windows) {
    const r = solveCarbonate({
      salinity: w.down.salinity,
      tempC: w.down.tempC,
      taUmolKg: w.down.taUmolKg as number,
      pco2Uatm: w.down.pco2Uatm as number,
    });
    if (r.ok) sink += r.dicUmolKg;
  }
  return windows.length;
});

const run = (uncertainty: boolean) => () => {
  let prev: FluxResult | undefined;
  for (let i = 0; i < windows.length; i++) {
    const r = computeTransectFlux(windows[i] as TransectWindow, undefined, params[i]!, { uncertainty });
    if (r.necMmolM2H === null) throw new Error('benchmark window without NEC');
    sink += r.necMmolM2H;
    prev = r;
  }
  return prev ? windows.length : 0;
};
const coreRate = timeIt(`flux update, ${N_TRANSECTS} transects, O2 budget + inverse NEC`, 3000, run(false));
const fullRate = timeIt(`  ... with first-order uncertainties (implicit function)`, 3000, run(true));

console.log('');
console.log(
  `updates per second (core): ${coreRate.toFixed(0)}; all ${N_TRANSECTS} transects every ${((1000 * N_TRANSECTS) / coreRate).toFixed(2)} ms`,
);
console.log(
  `updates per second (with sigmas): ${fullRate.toFixed(0)}; all ${N_TRANSECTS} transects every ${((1000 * N_TRANSECTS) / fullRate).toFixed(2)} ms`,
);
console.log(
  `ratio update/solve (core): one update costs ${(solveRate / coreRate).toFixed(1)} carbonate solves`,
);
console.log(
  `ratio update/solve (with sigmas): one update costs ${(solveRate / fullRate).toFixed(1)} carbonate solves`,
);
if (sink === 0) console.log('');
