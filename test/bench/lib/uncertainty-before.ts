// The carbonate uncertainty propagation as first written (libs/carbonate/uncertainty.ts before issue 17):
// constants recomputed for every perturbed solve, records filled by key. Kept as the reference that the
// faster propagation must equal number for number (libs/carbonate/uncertainty.test.ts), and as the "before"
// of the carbonate benchmark.
import {
  createConstants,
  DEFAULT_CONSTANT_SIGMAS,
  equilibriumConstantsInto,
  resolveCarbonateOptions,
  solveCarbonate,
  solveWithConstants,
  STATE,
  STATE_LENGTH,
  UNCERTAIN_OUTPUTS,
  type CarbonateInput,
  type CarbonateOptions,
  type CarbonateSigmas,
  type CarbonateUncertaintyResult,
  type ConstantSigmas,
  type ResolvedCarbonateOptions,
  type UncertainOutput,
} from '../../../libs/carbonate/index.js';

type Src = {
  name: string;
  sigma: number;
  kind: 'input' | 'temp' | 'outTemp' | 'salinity' | 'pk' | 'bt';
  key: string;
};
const REF_INPUTS = [
  'taUmolKg',
  'dicUmolKg',
  'phTotal',
  'pco2Uatm',
  'fco2Uatm',
  'po4UmolKg',
  'sio4UmolKg',
] as const;
const REF_PK = {
  pK0: 'k0',
  pK1: 'k1',
  pK2: 'k2',
  pKB: 'kb',
  pKW: 'kw',
  pKspAr: 'kspAr',
  pKspCa: 'kspCa',
} as const;
const REF_STATE: Record<UncertainOutput, number> = {
  taUmolKg: STATE.ta,
  dicUmolKg: STATE.dic,
  phTotal: STATE.ph,
  pco2Uatm: STATE.pco2,
  fco2Uatm: STATE.fco2,
  co3UmolKg: STATE.co3,
  hco3UmolKg: STATE.hco3,
  co2UmolKg: STATE.co2,
  omegaAr: STATE.omegaAr,
  omegaCa: STATE.omegaCa,
  revelle: STATE.revelle,
};

function refEvaluate(
  input: CarbonateInput,
  opts: ResolvedCarbonateOptions,
  p: { kind: Src['kind']; key: string; delta: number } | undefined,
  state: Float64Array,
): boolean {
  let inp = input;
  if (p?.kind === 'input')
    inp = {
      ...input,
      [p.key]: ((input as unknown as Record<string, number | undefined>)[p.key] ?? 0) + p.delta,
    };
  const s = input.salinity + (p?.kind === 'salinity' ? p.delta : 0);
  const tIn = input.tempC + (p?.kind === 'temp' ? p.delta : 0);
  const pIn = input.seaPressureDbar ?? 0;
  const tOut0 = input.outTempC ?? input.tempC;
  const tOut =
    tOut0 + (p?.kind === 'outTemp' || (p?.kind === 'temp' && input.outTempC === undefined) ? p.delta : 0);
  const pOut = input.outSeaPressureDbar ?? pIn;
  const cIn = createConstants();
  equilibriumConstantsInto(cIn, s, tIn, pIn, opts);
  let cOut = cIn;
  if (tOut !== tIn || pOut !== pIn) {
    cOut = createConstants();
    equilibriumConstantsInto(cOut, s, tOut, pOut, opts);
  }
  if (p?.kind === 'pk' || p?.kind === 'bt') {
    for (const c of cOut === cIn ? [cIn] : [cIn, cOut]) {
      if (p.kind === 'bt') c.bt *= 1 + p.delta;
      else c[REF_PK[p.key as keyof typeof REF_PK]] *= Math.pow(10, -p.delta);
    }
  }
  return solveWithConstants(cIn, cOut, inp, state) === undefined;
}

export function referenceUncertainty(
  input: CarbonateInput,
  sigmas: CarbonateSigmas,
  options?: CarbonateOptions,
): CarbonateUncertaintyResult {
  const central = solveCarbonate(input, options);
  if (!central.ok) return central;
  const opts = resolveCarbonateOptions(options);
  const sources: Src[] = [];
  for (const k of REF_INPUTS) {
    const sg = sigmas[k];
    if (sg !== undefined && sg > 0 && input[k] !== undefined)
      sources.push({ name: k, sigma: sg, kind: 'input', key: k });
  }
  if (sigmas.tempC !== undefined && sigmas.tempC > 0)
    sources.push({ name: 'tempC', sigma: sigmas.tempC, kind: 'temp', key: 'tempC' });
  if (sigmas.outTempC !== undefined && sigmas.outTempC > 0 && input.outTempC !== undefined)
    sources.push({ name: 'outTempC', sigma: sigmas.outTempC, kind: 'outTemp', key: 'outTempC' });
  if (sigmas.salinity !== undefined && sigmas.salinity > 0)
    sources.push({ name: 'salinity', sigma: sigmas.salinity, kind: 'salinity', key: 'salinity' });
  if (sigmas.constants !== 'none') {
    const cs: ConstantSigmas = { ...DEFAULT_CONSTANT_SIGMAS, ...(sigmas.constants ?? {}) };
    for (const k of Object.keys(REF_PK) as (keyof typeof REF_PK)[])
      if (cs[k] > 0) sources.push({ name: k, sigma: cs[k], kind: 'pk', key: k });
    if (cs.btRel > 0) sources.push({ name: 'btRel', sigma: cs.btRel, kind: 'bt', key: 'bt' });
  }
  const zero = () =>
    Object.fromEntries(UNCERTAIN_OUTPUTS.map((k) => [k, 0])) as Record<UncertainOutput, number>;
  const sigma = zero();
  const contributions: Record<string, Record<UncertainOutput, number>> = {};
  const jacobian: Record<string, Record<UncertainOutput, number>> = {};
  const plus = new Float64Array(STATE_LENGTH);
  const minus = new Float64Array(STATE_LENGTH);
  const mid = new Float64Array(STATE_LENGTH);
  refEvaluate(input, opts, undefined, mid);
  for (const src of sources) {
    const d = 0.01 * src.sigma;
    const okPlus = refEvaluate(input, opts, { kind: src.kind, key: src.key, delta: d }, plus);
    const okMinus = refEvaluate(input, opts, { kind: src.kind, key: src.key, delta: -d }, minus);
    let lo: Float64Array;
    let hi: Float64Array;
    let width: number;
    if (okPlus && okMinus) [lo, hi, width] = [minus, plus, 2 * d];
    else if (okPlus) [lo, hi, width] = [mid, plus, d];
    else if (okMinus) [lo, hi, width] = [minus, mid, d];
    else
      return {
        ok: false,
        flag: 4,
        code: 'REEFD_CARBONATE_NO_ROOT',
        reason: `perturbing ${src.name} by +-${d} leaves the system without a solution; the input is at the edge of its domain`,
      };
    const contrib = zero();
    const jrow = zero();
    for (const out of UNCERTAIN_OUTPUTS) {
      const i = REF_STATE[out];
      const jac = (hi[i]! - lo[i]!) / width;
      const v = jac * src.sigma;
      jrow[out] = jac;
      contrib[out] = v * v;
      sigma[out] += v * v;
    }
    contributions[src.name] = contrib;
    jacobian[src.name] = jrow;
  }
  for (const out of UNCERTAIN_OUTPUTS) sigma[out] = Math.sqrt(sigma[out]);
  return { ok: true, flag: central.flag, value: central, sigma, contributions, jacobian };
}
