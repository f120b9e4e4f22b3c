// Benchmark: one 2048-sample bottom-pressure burst (2 Hz, 17 min) through analyzeBurst (gaps, head, detrend,
// despike, Welch, dispersion and Kp per bin, bulk statistics, whole-burst reconstruction and zero crossings),
// against baselines measured in the same run: the bare fft.js 2048-point real transform, and welchPsd alone.
// A 1800-sample burst shows the cost of the Bluestein path (half-length) for lengths that are not a power of two.
// The burst as a message carries it (a plain array with null for bad samples) is analysed directly, against
// the earlier path that first copied it into a Float64Array through a per-sample callback.
// Run: npx tsx test/bench/waves.bench.ts   (goal: under 200 us per 2048-sample burst on one core)
import FFT from 'fft.js';
import { analyzeBurst, jonswapPressureBurst, welchPsd } from '../../libs/waves/index.js';

/** mulberry32 (a small seeded 32-bit PRNG), so the burst is the same in every run */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const burst = (n: number): Float64Array =>
  jonswapPressureBurst(
    { hm0M: 0.6, tpS: 9 },
    { n, fsHz: 2, depthM: 2.5, sensorHeightM: 0.3, rhoKgM3: 1023.3, patmDbar: 10.1325 },
    mulberry32(2026),
  ).pDbar;

const p2048 = burst(2048);
const p1800 = burst(1800);
const input = (p: Float64Array) => ({
  pDbar: p,
  fsHz: 2,
  t0Ms: 0,
  sensorHeightM: 0.3,
  patmDbar: 10.1325,
  rhoKgM3: 1023.3,
});

let sink = 0;

/**
 * Microseconds of CPU time per call (process.cpuUsage, user + system: a shared, loaded machine deschedules
 * this process, which wall-clock time would count). The scenarios run interleaved, round by round, so each
 * sees the same machine state; the median of 7 rounds is reported.
 */
function bench(cases: { label: string; iter: number; fn: () => void }[]): number[] {
  for (const c of cases) for (let i = 0; i < Math.min(c.iter, 300); i++) c.fn(); // warm-up: JIT, plan caches
  const rounds: number[][] = cases.map(() => []);
  for (let r = 0; r < 7; r++) {
    cases.forEach((c, j) => {
      const t0 = process.cpuUsage();
      for (let i = 0; i < c.iter; i++) c.fn();
      const d = process.cpuUsage(t0);
      (rounds[j] as number[]).push((d.user + d.system) / c.iter);
    });
  }
  return rounds.map((xs, j) => {
    xs.sort((a, b) => a - b);
    const us = xs[3] as number;
    console.log(`${(cases[j] as { label: string }).label.padEnd(48)} ${us.toFixed(1).padStart(8)} us`);
    return us;
  });
}

const fft = new FFT(2048);
const fftIn = Float64Array.from(p2048);
// Float64Array in and out, as the library uses them (mixing plain arrays in would make fft.js polymorphic)
const fftOut = new Float64Array(4096);

// p_dbar as it comes out of JSON.parse (4 decimals on the wire), with one flagged sample.
const wire: (number | null)[] = JSON.parse(
  JSON.stringify(Array.from(p2048, (x) => Math.round(x * 1e4) / 1e4)),
);
wire[700] = null;

const [base, welch, full, odd, copyPath, arrayPath] = bench([
  {
    label: 'baseline: fft.js realTransform, 2048 points',
    iter: 4000,
    fn: () => {
      fft.realTransform(fftOut, fftIn);
      sink += fftOut[2] as number;
    },
  },
  {
    label: 'welchPsd, 2048 samples, nperseg 512',
    iter: 1000,
    fn: () => (sink += welchPsd(p2048, 2, 512).psd[10] as number),
  },
  {
    label: 'analyzeBurst, 2048 samples',
    iter: 500,
    fn: () => {
      const r = analyzeBurst(input(p2048));
      if (r.ok) sink += r.hm0M;
    },
  },
  {
    label: 'analyzeBurst, 1800 samples (Bluestein, size N/2)',
    iter: 300,
    fn: () => {
      const r = analyzeBurst(input(p1800));
      if (r.ok) sink += r.hm0M;
    },
  },
  {
    label: 'p_dbar -> Float64Array.from(mapper) -> analyzeBurst',
    iter: 500,
    fn: () => {
      const r = analyzeBurst(input(Float64Array.from(wire, (x) => (x === null ? Number.NaN : x))));
      if (r.ok) sink += r.hm0M;
    },
  },
  {
    label: 'p_dbar (plain array) -> analyzeBurst',
    iter: 500,
    fn: () => {
      const r = analyzeBurst({ ...input(p2048), pDbar: wire });
      if (r.ok) sink += r.hm0M;
    },
  },
]) as [number, number, number, number, number, number];

console.log('');
console.log(
  `analyzeBurst 2048 / fft.js 2048       ratio ${(full / base).toFixed(1)}x  (goal: < 200 us, got ${full.toFixed(0)} us)`,
);
console.log(`analyzeBurst 2048 / welchPsd 2048     ratio ${(full / welch).toFixed(1)}x`);
console.log(`analyzeBurst 1800 / analyzeBurst 2048 ratio ${(odd / full).toFixed(2)}x`);
console.log(
  `burst as carried (plain array) / copied through a callback: ratio ${(arrayPath / copyPath).toFixed(2)} ` +
    `(${copyPath.toFixed(0)} -> ${arrayPath.toFixed(0)} us)`,
);
if (!Number.isFinite(sink)) console.log('unreachable');
