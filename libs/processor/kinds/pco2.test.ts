// The pCO2 kind's carbonate records carry the standard uncertainties libs/carbonate propagates from the input
// sigmas the method page names (docs/methods/uncertainty.md 9.1): each record's sigma equals the library's
// for the same inputs, with TA from salinity (10 umol/kg) and from a bottle (3 umol/kg).
import { describe, expect, it } from 'vitest';
import { carbonateUncertainty } from '../../carbonate/index.js';
import { parseConfigText, type CarbonateRecord, type SensorMessage } from '../../contract/index.js';
import { createProcessor } from '../index.js';
import { DEPLOYMENT_CONFIG, deploymentMessages, HOUR, T0 } from '../test-helpers.js';

const BARO_HPA = 1010.4;

const parsed = parseConfigText(`${DEPLOYMENT_CONFIG}alkalinity: { source: samples }\n`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;

/**
 * Six hours of the test deployment, TA from bottles where there is one, with a steady barometer so each
 * record's inputs are known exactly.
 */
function run(): { records: CarbonateRecord[]; pco2: Map<string, number> } {
  const messages: SensorMessage[] = deploymentMessages(6, { bottlesAt: [T0 + 2 * HOUR] }).map((m) =>
    m.kind === 'met' ? { ...m, baro_hpa: BARO_HPA } : m,
  );
  const pco2 = new Map<string, number>();
  for (const m of messages) if (m.kind === 'pco2') pco2.set(`${m.station}@${m.t}`, m.pco2_uatm);
  const processor = createProcessor(config);
  const out = messages.flatMap((m) => processor.push(m, m.tMs + 1000).records);
  out.push(...processor.drain());
  const records = out.filter((r): r is CarbonateRecord => r.type === 'carbonate');
  return { records, pco2 };
}

describe('pco2 kind: carbonate uncertainty on the record', () => {
  const { records, pco2 } = run();

  it('gives every carbonate record the pH, aragonite and DIC sigma of libs/carbonate', () => {
    const sources = new Set<string>();
    expect(records.length).toBeGreaterThan(50);
    for (const r of records) {
      const pco2Uatm = pco2.get(`${r.station}@${r.t}`);
      if (pco2Uatm === undefined) throw new Error(`no pCO2 message for ${r.station} at ${r.t}`);
      sources.add(r.ta_source);
      const ref = carbonateUncertainty(
        {
          salinity: r.sal as number,
          tempC: r.temp_c as number,
          pco2Uatm,
          taUmolKg: r.ta_umol_kg as number,
          outTempC: r.temp_c as number,
          baroHpa: BARO_HPA,
        },
        {
          pco2Uatm: Math.max(2, 0.01 * pco2Uatm),
          taUmolKg: r.ta_source === 'salinity' ? 10 : 3,
          tempC: 0.05,
          salinity: 0.05,
        },
        { carbonicConstants: config.carbonate.carbonic_constants, boron: config.carbonate.boron },
      );
      if (!ref.ok) throw new Error(ref.reason);
      // The record's solve starts from the station's last pH; the reference starts cold. Both stop within
      // 1e-10 pH of the root, which moves the central differences by far less than 1e-6 relative.
      expect(relErr(r.ph_total_sigma, ref.sigma.phTotal)).toBeLessThan(1e-6);
      expect(relErr(r.omega_ar_sigma, ref.sigma.omegaAr)).toBeLessThan(1e-6);
      expect(relErr(r.dic_umol_kg_sigma, ref.sigma.dicUmolKg)).toBeLessThan(1e-6);
    }
    expect([...sources].sort()).toEqual(['salinity', 'sample']);
  });

  it('reports a bottle TA (3 umol/kg) with a smaller DIC sigma than TA from salinity (10 umol/kg)', () => {
    const back = records.filter((r) => r.station === 'back');
    const fromSalinity = back.find((r) => r.ta_source === 'salinity')!;
    const fromBottle = back.find((r) => r.ta_source === 'sample')!;
    expect(fromBottle.dic_umol_kg_sigma as number).toBeLessThan(fromSalinity.dic_umol_kg_sigma as number);
    // pH at 1 % pCO2 with the constants' sigmas: a few thousandths (Orr et al. 2018, Table 3, from memory)
    expect(fromSalinity.ph_total_sigma as number).toBeGreaterThan(0.003);
    expect(fromSalinity.ph_total_sigma as number).toBeLessThan(0.02);
  });
});

function relErr(got: unknown, want: number): number {
  if (typeof got !== 'number') return Infinity;
  return Math.abs(got - want) / Math.abs(want);
}
