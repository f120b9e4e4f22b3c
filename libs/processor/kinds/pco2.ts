// pCO2 sensor: the carbonate system at each reading (docs/methods/carbonate.md 3.6, 3.8), reported at the
// station CTD's temperature with TA from salinity or bottle samples, a `carbonate` record per reading, and the
// pCO2, TA and DIC series of the flux windows. The last pH is the warm start of the next solve.
import type { CarbonateRecord, Pco2Message } from '../../contract/index.js';
import { carbonateUncertainty, solveCarbonate, type CarbonateInput } from '../../carbonate/index.js';
import { baroAt, ctdAt, taFor, worst, type DeriveContext, type TaSource } from '../derive.js';
import { atSampleTime, defineKind } from './types.js';

export const pco2 = defineKind({
  kind: 'pco2',
  order: 7,
  qcVariables: ['pco2_uatm'],
  writes: { station: ['pco2', 'ta', 'dic', 'omega'], site: [] },
  reads: { station: ['temp', 'sal', 'sampleTa', 'sampleSal'], site: ['baro'] },
  completeMs: atSampleTime,
  derive(m, io) {
    const f0 = io.qc('pco2.pco2_uatm', 'pco2_uatm', m.pco2_uatm);
    if (f0 === 4) return; // a failed reading never feeds a derivation (docs/methods/qc.md 7.4)
    const r = deriveCarbonate(io.ctx, m, io.sensorState.lastPh);
    if ('skip' in r) return;
    const f = Math.max(f0, r.flag);
    r.record.flag = f;
    io.sensorState.lastPh = r.ph;
    io.emit(r.record);
    io.observe(r.record, f);
    io.put('pco2', m.tMs, r.pco2Out, f);
    io.put('ta', m.tMs, r.ta, f);
    io.put('dic', m.tMs, r.dic, f);
    if (r.record.omega_ar !== null) io.put('omega', m.tMs, r.record.omega_ar, f);
  },
});

/**
 * Standard uncertainties of pH, aragonite saturation and DIC, propagated by libs/carbonate from those of
 * the inputs (docs/methods/uncertainty.md 9.1, 9.3): pCO2 1 % (at least 2 uatm), TA 10 umol/kg from salinity
 * or 3 from a bottle, 0.05 degC and 0.05 in salinity. Added to the record where finite.
 */
function addSigmas(
  ctx: DeriveContext,
  record: CarbonateRecord,
  input: CarbonateInput,
  pco2Uatm: number,
  taSource: TaSource,
): void {
  const sig = carbonateUncertainty(
    input,
    {
      pco2Uatm: Math.max(2, 0.01 * pco2Uatm),
      taUmolKg: taSource === 'salinity' ? 10 : 3,
      tempC: 0.05,
      salinity: 0.05,
    },
    ctx.carbonateOptions,
    // Only the sigmas reach the record: no per-source contributions or Jacobian rows to build.
    'sigma',
  );
  // A system the perturbations push past its domain has no sigmas; the record goes out without them.
  if (!sig.ok) return;
  const put = (name: string, v: number): void => {
    if (Number.isFinite(v)) (record as Record<string, unknown>)[name] = v;
  };
  put('ph_total_sigma', sig.sigma.phTotal);
  put('omega_ar_sigma', sig.sigma.omegaAr);
  put('dic_umol_kg_sigma', sig.sigma.dicUmolKg);
}

/** The carbonate system at a pCO2 reading, reported at the CTD temperature (docs/methods/carbonate.md 3.6, 3.8). */
export function deriveCarbonate(
  ctx: DeriveContext,
  m: Pco2Message,
  warmPh: number | undefined,
):
  | { record: CarbonateRecord; flag: number; ph: number; ta: number; dic: number; pco2Out: number }
  | { skip: string } {
  const ctd = ctdAt(ctx, m.station, m.tMs);
  if (!ctd) return { skip: 'no_ctd' };
  const S = ctd.sal.value;
  const tOut = ctd.temp.value;
  const tIn = m.temp_c ?? tOut;
  const { ta, source } = taFor(ctx, m.station, m.tMs, S);
  const baro = baroAt(ctx, m.tMs);
  const input: CarbonateInput = {
    salinity: S,
    tempC: tIn,
    pco2Uatm: m.pco2_uatm,
    taUmolKg: ta,
    outTempC: tOut,
    baroHpa: baro.hpa,
    ...(warmPh !== undefined ? { initialPh: warmPh } : {}),
  };
  const r = solveCarbonate(input, ctx.carbonateOptions);
  if (!r.ok) return { skip: `carbonate:${r.code}` };
  const flag = worst(r.flag, ctd.sal.flag, ctd.temp.flag, baro.source === 'default' ? 2 : 1);
  const record: CarbonateRecord = {
    type: 'carbonate',
    site: ctx.config.site,
    t: m.t,
    station: m.station,
    ta_umol_kg: r.taUmolKg,
    dic_umol_kg: r.dicUmolKg,
    ph_total: r.phTotal,
    pco2_uatm: r.pco2Uatm,
    co3_umol_kg: r.co3UmolKg,
    omega_ar: r.omegaAr,
    omega_ca: r.omegaCa,
    ta_source: source,
    hco3_umol_kg: r.hco3UmolKg,
    co2_umol_kg: r.co2UmolKg,
    revelle: r.revelle,
    temp_c: tOut,
    sal: S,
    sensor: m.sensor,
    flag,
    constants: `${ctx.config.carbonate.carbonic_constants}/${ctx.config.carbonate.boron}`,
  };
  addSigmas(ctx, record, input, m.pco2_uatm, source);
  return { record, flag, ph: r.phTotal, ta: r.taUmolKg, dic: r.dicUmolKg, pco2Out: r.pco2Uatm };
}
