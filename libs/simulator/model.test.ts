import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../contract/index.js';
import { speciate } from './chemistry.js';
import { ReefModel } from './model.js';
import { createRng } from './prng.js';
import { siteLayout } from './site.js';

function ornenConfig() {
  const text = readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8');
  const r = parseConfigText(text);
  if (!r.ok) throw new Error(`demo config invalid: ${JSON.stringify(r.problems)}`);
  return r.config;
}

const layout = siteLayout(ornenConfig());
const START = Date.UTC(2026, 2, 1);

/** Diurnal pCO2 range on the mid flat over the second simulated day, for a fixed offshore wave height. */
function flatSwing(hrmsM: number): { swing: number; meanU: number } {
  const m = new ReefModel(layout, createRng(11), {
    startMs: START,
    stepS: 120,
    taS35UmolKg: 2300,
    waves: { hrmsM, tpS: 10 },
  });
  let lo = Infinity;
  let hi = -Infinity;
  let u = 0;
  let n = 0;
  for (let k = 0; k < 2 * 720; k++) {
    const s = m.step();
    if (k < 720) continue; // day 1 spins the budget up
    const p = speciate(s.roles.flat.water).pco2Uatm;
    lo = Math.min(lo, p);
    hi = Math.max(hi, p);
    u += s.flow.uFlatMS;
    n++;
  }
  return { swing: hi - lo, meanU: u / n };
}

describe('reef chemistry follows the physics', () => {
  const small = flatSwing(0.6);
  const moderate = flatSwing(0.9);
  const large = flatSwing(1.8);

  it('larger waves flush the flat faster and shrink the diurnal pCO2 swing', () => {
    expect(large.meanU).toBeGreaterThan(moderate.meanU);
    expect(moderate.meanU).toBeGreaterThan(small.meanU);
    expect(large.swing).toBeLessThan(moderate.swing);
    expect(moderate.swing).toBeLessThan(small.swing);
  });

  it('swings pCO2 on the flat by of order 150 uatm a day at moderate waves', () => {
    // Reef-flat diurnal pCO2 ranges of ~100-300 uatm at moderate flushing (common practice).
    expect(moderate.swing).toBeGreaterThan(90);
    expect(moderate.swing).toBeLessThan(300);
  });

  it('draws pCO2 down by day and up by night on the flat, with O2 the mirror image', () => {
    const m = new ReefModel(layout, createRng(3), {
      startMs: START,
      stepS: 300,
      taS35UmolKg: 2300,
      waves: { hrmsM: 1, tpS: 10 },
    });
    const rows: { par: number; pco2: number; o2: number; o2Off: number; pco2Off: number }[] = [];
    for (let k = 0; k < 2 * 288; k++) {
      const s = m.step();
      if (k < 288) continue;
      rows.push({
        par: s.parUmolM2S,
        pco2: speciate(s.roles.flat.water).pco2Uatm,
        pco2Off: speciate(s.roles.fore.water).pco2Uatm,
        o2: s.roles.flat.water.o2UmolKg,
        o2Off: s.roles.fore.water.o2UmolKg,
      });
    }
    const day = rows.filter((r) => r.par > 1200);
    const night = rows.filter((r) => r.par === 0);
    expect(day.length).toBeGreaterThan(10);
    expect(night.length).toBeGreaterThan(10);
    for (const r of day) {
      expect(r.pco2).toBeLessThan(r.pco2Off);
      expect(r.o2).toBeGreaterThan(r.o2Off);
    }
    for (const r of night) {
      expect(r.pco2).toBeGreaterThan(r.pco2Off);
      expect(r.o2).toBeLessThan(r.o2Off);
    }
  });

  it('keeps the tide range near 1 m at springs', () => {
    // M2 0.37 m + S2 0.13 m: spring range 2 (0.37 + 0.13) = 1.0 m (fictional site, brief: ~1 m).
    const m = new ReefModel(layout, createRng(5), { startMs: START, stepS: 600, taS35UmolKg: 2300 });
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = 0; k < 15 * 144; k++) {
      const t = m.step().tideM;
      lo = Math.min(lo, t);
      hi = Math.max(hi, t);
    }
    expect(hi - lo).toBeGreaterThan(0.9);
    expect(hi - lo).toBeLessThanOrEqual(1.0);
  });
});
