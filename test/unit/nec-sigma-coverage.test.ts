// Honest metabolism (docs/methods/uncertainty.md 9.2): the stated sigma of each window's NCP and inverse NEC
// must cover the real scatter of replicated runs. Forty runs of one simulated reef (the same environment:
// tide, waves, light, metabolism) differ in their sensors' noise and in calibration errors drawn from the
// typical accuracies the sigmas assume (libs/simulator calibration-errors.ts, uncertainty.md 9.3). Per window,
// each run's deviation from the mean of the runs must lie within its stated sigma about 68 % of the time
// (first-order propagation of Gaussian errors), 68 +- 10 %.
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type DerivedRecord } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';

// The demo reef's two transects and the mast (deploy/demo/ornen-reef.yaml without the fore reef, lagoon and
// channel stations, which no transect reads).
const parsed = parseConfigText(`
site: ornen-reef
reef_axis_deg: 270
latitude_deg: 8.01
stations:
  crest:
    position: { lat: 8.0100, lon: -144.9290 }
    sensors:
      p-crest: { kind: pressure, height_m: 0.20 }
      adcp-crest: { kind: adcp, height_m: 0.30, beam_angle_deg: 25, orientation: up, declination_deg: 10.5 }
      ctd-crest: { kind: ctd }
      o2-crest: { kind: oxygen }
      co2-crest: { kind: pco2 }
  flat:
    position: { lat: 8.0100, lon: -144.9306 }
    sensors:
      p-flat: { kind: pressure, height_m: 0.15 }
      adcp-flat: { kind: adcp, height_m: 0.30, beam_angle_deg: 25, orientation: up, declination_deg: 10.5 }
      ctd-flat: { kind: ctd }
      o2-flat: { kind: oxygen, sal_setting: 0 }
      co2-flat: { kind: pco2 }
      par-flat: { kind: par }
  back:
    position: { lat: 8.0100, lon: -144.9322 }
    sensors:
      p-back: { kind: pressure, height_m: 0.15 }
      adcp-back: { kind: adcp, height_m: 0.30, beam_angle_deg: 25, orientation: up, declination_deg: 10.5 }
      ctd-back: { kind: ctd }
      o2-back: { kind: oxygen }
      co2-back: { kind: pco2 }
  mast:
    position: { lat: 8.0105, lon: -144.9330 }
    sensors:
      met: { kind: met, wind_height_m: 6 }
alkalinity: { source: salinity, ta_s35_umol_kg: 2300 }
transects:
  outer: { upstream: crest, downstream: flat, length_m: 180, current: flat, pq: 1.0 }
  inner: { upstream: flat, downstream: back, length_m: 170, current: back, pq: 1.0 }
`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;

// The scatter of an error drawn once per run (a calibration) is sampled once per run: with 40 runs a coverage
// of 68 % is known to about +-7 % (binomial), so fewer runs would test the draws rather than the sigmas.
const RUNS = 40;
const START = Date.UTC(2026, 5, 10, 20); // 10:00 local (UTC-10): two hours of the late morning after a warm-up
const HOURS = 3;

interface Sample {
  value: number;
  sigma: number;
}

/** Windows with a value and a sigma, per field and window key (transect and time), over the runs. */
function replicate(): Record<'nec' | 'ncp', Map<string, Sample[]>> {
  const out = { nec: new Map<string, Sample[]>(), ncp: new Map<string, Sample[]>() };
  for (let k = 0; k < RUNS; k++) {
    const sim = simulateMessages(config, {
      startMs: START,
      durationMs: HOURS * 3_600_000,
      seed: 5,
      noiseSeed: 100 + k,
      calibrationErrors: true,
      faults: false,
    });
    const p = createProcessor(config);
    const records: DerivedRecord[] = [];
    for (const m of sim.messages) {
      const r = parseMessage(m.topic, JSON.stringify(m.payload));
      if (!r.ok) throw new Error(r.reason);
      records.push(...p.push(r.message, m.tMs + 250).records);
    }
    records.push(...p.drain());
    for (const f of records) {
      // The first hour has no previous windows for the storage term and the inverse's storage form.
      if (f.type !== 'flux' || !f.valid || Date.parse(f.t) < START + 3_600_000) continue;
      for (const [field, value, sigma] of [
        ['nec', f.nec_mmol_m2_h, f.nec_sigma_mmol_m2_h],
        ['ncp', f.ncp_mmol_m2_h, f.ncp_sigma_mmol_m2_h],
      ] as const) {
        if (typeof value !== 'number' || typeof sigma !== 'number') continue;
        const key = `${f.transect} ${f.t}`;
        const list = out[field].get(key) ?? [];
        list.push({ value, sigma });
        out[field].set(key, list);
      }
    }
  }
  return out;
}

/**
 * Share of (run, window) pairs whose deviation from the window's mean over the runs is within the stated sigma;
 * the deviation from a mean of n has variance sigma^2 (1 - 1/n), so the sigma is scaled by that.
 */
function coverage(windows: Map<string, Sample[]>): { share: number; pairs: number; windows: number } {
  let inside = 0;
  let pairs = 0;
  let n = 0;
  for (const xs of windows.values()) {
    if (xs.length < 0.8 * RUNS) continue; // a window valid in most runs (validity tests have thresholds)
    n++;
    const mean = xs.reduce((a, x) => a + x.value, 0) / xs.length;
    const f = Math.sqrt(1 - 1 / xs.length);
    for (const x of xs) {
      pairs++;
      if (Math.abs(x.value - mean) <= x.sigma * f) inside++;
    }
  }
  return { share: inside / pairs, pairs, windows: n };
}

describe('stated sigma against the scatter of replicated runs', () => {
  const windows = replicate();
  for (const field of ['nec', 'ncp'] as const) {
    it(`${field.toUpperCase()}: the stated sigma covers 68 +- 10 % of the runs`, () => {
      const c = coverage(windows[field]);
      console.log(
        `sigma coverage: ${field} ${(100 * c.share).toFixed(1)} % of ${c.pairs} (${c.windows} windows x ${RUNS} runs)`,
      );
      expect(c.windows).toBeGreaterThan(15);
      expect(c.share).toBeGreaterThanOrEqual(0.58);
      expect(c.share).toBeLessThanOrEqual(0.78);
    });
  }
});
