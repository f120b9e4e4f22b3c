// Benchmark: one 30-bin beam-coordinate ADCP ensemble through processEnsemble (QC, three-beam logic,
// transforms, side lobes, depth average, reef frame, uncertainty), against a baseline measured in the
// same run: the bare beam -> instrument -> earth matrix products for the same 30 bins.
// Run: npx tsx test/bench/currents.bench.ts   (goal: under 10 us per ensemble on one core)
import {
  beamToInstrument,
  instrumentToEarth,
  janusHead,
  processEnsemble,
  sensorRotationMatrix,
  synthesizeBeamEnsemble,
  type AdcpSensorConfig,
} from '../../libs/currents/index.js';

const sensor: AdcpSensorConfig = { heightM: 0.35, beamAngleDeg: 25, orientation: 'up', declinationDeg: 4 };
const ctx = { depthM: 3.6, hm0SsM: 0.5, reefAxisDeg: 270 };
const ens = synthesizeBeamEnsemble({
  sensor,
  nBins: 30,
  blankM: 0.1,
  binM: 0.1,
  headingDeg: 117,
  pitchDeg: 1.8,
  rollDeg: -2.3,
  profile: (z) => [0.2 * Math.pow(z / 3.6, 1 / 6), -0.05, 0],
});
// one bad beam in bin 5 exercises the three-beam path
const velMS = ens.velMS.map((row, n) => (n === 5 ? [row[0] ?? 0, null, row[2] ?? 0, row[3] ?? 0] : row));
const input = { ...ens, velMS };

let sink = 0;

function runProcess(iter: number): void {
  for (let k = 0; k < iter; k++) {
    const r = processEnsemble(input, sensor, ctx);
    if (r.ok) sink += r.eastMS;
  }
}

const head = janusHead(25);
const rot = new Float64Array(9);
const inst = new Float64Array(4);
const earth = new Float64Array(4);
const beam = new Float64Array(4);
function runBaseline(iter: number): void {
  for (let k = 0; k < iter; k++) {
    sensorRotationMatrix(sensor, 117, 1.8, -2.3, rot);
    for (let n = 0; n < 30; n++) {
      const row = ens.velMS[n] as readonly (number | null)[];
      beam[0] = row[0] ?? 0;
      beam[1] = row[1] ?? 0;
      beam[2] = row[2] ?? 0;
      beam[3] = row[3] ?? 0;
      beamToInstrument(beam, head, inst);
      instrumentToEarth(inst, rot, earth);
      sink += earth[0] as number;
    }
  }
}

/**
 * Median over `reps` timed runs of `iter` calls, in microseconds per call. Timed in process CPU time
 * (user + system), which a shared, loaded machine disturbs far less than wall-clock time.
 */
function timeUs(fn: (iter: number) => void, iter: number, reps: number): number {
  fn(iter); // warm-up: let the JIT settle
  const t: number[] = [];
  for (let r = 0; r < reps; r++) {
    const c0 = process.cpuUsage();
    fn(iter);
    const c = process.cpuUsage(c0);
    t.push((c.user + c.system) / iter);
  }
  t.sort((a, b) => a - b);
  return t[Math.floor(reps / 2)] as number;
}

const check = processEnsemble(input, sensor, ctx);
if (!check.ok) throw new Error(`benchmark ensemble failed: ${check.message}`);
const base = timeUs(runBaseline, 50_000, 7);
const full = timeUs(runProcess, 50_000, 7);
console.log(`currents: 30-bin beam ensemble (${check.binsUsed} bins used, flag ${check.flag})`);
console.log(`  baseline beam->earth products  ${base.toFixed(2)} us/ensemble`);
console.log(`  processEnsemble                ${full.toFixed(2)} us/ensemble  (goal < 10 us)`);
console.log(`  ratio processEnsemble/baseline ${(full / base).toFixed(1)}x`);
if (sink === 42) console.log(''); // keep the work observable to the optimiser
