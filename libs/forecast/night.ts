// Tonight's oxygen (docs/methods/forecast.md 11.5, 11.6): trajectories of O2 from the issue time to sunrise for
// every station with a model, the minimum before sunrise, its time, and an 80 % interval from a deterministic
// ensemble. Stations are evaluated in the order given, so a transect's upstream station and a box's source
// are forecast first and their trajectories (member by member) drive the stations downstream.
import { O2_MG_L_PER_MMOL_M3, stepBox, type BoxModel } from './box-model.js';
import { predictFlow, type FlowModel } from './flow-model.js';
import { haltonNormals, quantile } from './qmc.js';

/** Where the flow of a transect comes from: its flow model and the predicted depth at its current station. */
export interface FlowSource {
  flow: FlowModel;
  currentDepthM: (tMs: number) => number;
}

/** A station forecast by persistence (no physical model: the first station on the flow path). */
export interface PersistenceModel {
  kind: 'persistence';
  station: string;
  o2NowMgL: number;
  /** sd of the night's departure from persistence, mg/L. */
  sigmaMgL: number;
  /** Expected change from now (mg/L) at a time of the night: the station's mean course over past nights. */
  driftMgL?: (tMs: number) => number;
}

/** The downstream station of a transect: upstream O2 less the respiration over the transit. The water
 * crosses the transect's volume per metre L h at the transport q = u_c h_c (continuity), so the drop is
 * R c L / (u_c h_c) with the current station's velocity and depth. */
export interface TransectModel {
  kind: 'transect';
  station: string;
  upstream: string;
  lengthM: number;
  /** Night respiration of the transect, mmol O2 m-2 h-1, and its sigma. */
  rMmolM2H: number;
  rSigmaMmolM2H: number;
  flow: FlowSource;
  /** Observed minus modelled O2 at the issue time, mg/L: kept through the night (sensor offsets, PQ, air-sea). */
  offsetMgL: number;
}

/** A lagoon or pool: a one-box budget fed by a source station. */
export interface BoxStationModel {
  kind: 'box';
  station: string;
  source: string;
  o2NowMgL: number;
  box: BoxModel;
  depthM: (tMs: number) => number;
  /** The transect whose flow flushes the box (driver q/h_box), or none (driver 1). */
  feed?: FlowSource;
  /** Tonight's data replaced the fitted respiration (an anomaly; bookkeeping only). */
  anomalous?: boolean;
  /** A demand found rising tonight (mmol O2 m-2 h-2), carried on for rGrowthForH hours after the issue. */
  rGrowthMmolM2H2?: number;
  rGrowthForH?: number;
}

export type StationModel = PersistenceModel | TransectModel | BoxStationModel;

export interface NightInput {
  issueMs: number;
  /** Sunrise (end of the night), ms. */
  endMs: number;
  /** Offshore Hm0 now (persistence through the night) and the sd of its ln change over a night. */
  hm0OffshoreM: number;
  hm0LnSigma: number;
  /** Model time step, minutes (default 10). */
  stepMin?: number;
  /** Ensemble members (default 128). */
  members?: number;
  /** Slowest flow the transit allows, m/s (default 0.01: longer transits than about 5 h are not steady). */
  minSpeedMS?: number;
}

export interface StationForecast {
  station: string;
  kind: StationModel['kind'];
  /** Central forecast (all errors zero) of the minimum before sunrise and its time. */
  o2MinMgL: number;
  tMinMs: number;
  /** The members' 10 % and 90 % quantiles of the minimum (before any calibration). */
  loMgL: number;
  hiMgL: number;
  horizonH: number;
}

const DIMS = { hm0: 0, flow: 1, resp: 2, persist: 3, kappa: 4, boxResp: 5 } as const;

interface Member {
  hm0: number;
  flowFactor: number;
  z: Float64Array;
  zi: number;
}

function flowAt(src: FlowSource, m: Member, tMs: number, minU: number): number {
  const h = src.currentDepthM(tMs);
  return Math.max(minU, predictFlow(src.flow, m.hm0, h).uMS * m.flowFactor);
}

/** O2 trajectories (mg/L on the time grid) of every station for one member. */
function runMember(
  models: readonly StationModel[],
  times: number[],
  m: Member,
  minU: number,
): Map<string, Float64Array> {
  const out = new Map<string, Float64Array>();
  const z = (d: number) => m.z[m.zi + d] as number;
  for (const s of models) {
    const o = new Float64Array(times.length);
    if (s.kind === 'persistence') {
      const shift = s.o2NowMgL + s.sigmaMgL * z(DIMS.persist);
      for (let i = 0; i < times.length; i++) o[i] = shift + (s.driftMgL ? s.driftMgL(times[i] as number) : 0);
    } else if (s.kind === 'transect') {
      const up = out.get(s.upstream);
      if (!up) throw new RangeError(`station ${s.station}: upstream ${s.upstream} is not forecast before it`);
      const r = Math.max(0, s.rMmolM2H + s.rSigmaMmolM2H * z(DIMS.resp));
      for (let i = 0; i < times.length; i++) {
        const t = times[i] as number;
        const tauH = s.lengthM / flowAt(s.flow, m, t, minU) / 3600;
        o[i] = Math.max(
          0,
          (up[i] as number) - (r * O2_MG_L_PER_MMOL_M3 * tauH) / s.flow.currentDepthM(t) + s.offsetMgL,
        );
      }
    } else {
      const src = out.get(s.source);
      if (!src) throw new RangeError(`station ${s.station}: source ${s.source} is not forecast before it`);
      const kappa = Math.max(0, s.box.kappa + Math.sqrt(Math.max(0, s.box.cov[0] as number)) * z(DIMS.kappa));
      const r = s.box.rMmolM2H + Math.sqrt(Math.max(0, s.box.cov[3] as number)) * z(DIMS.boxResp);
      o[0] = s.o2NowMgL;
      for (let i = 1; i < times.length; i++) {
        const t0 = times[i - 1] as number;
        const dtH = ((times[i] as number) - t0) / 3.6e6;
        const tm = t0 + (dtH * 3.6e6) / 2;
        const h = s.depthM(tm);
        const driver = s.feed ? (flowAt(s.feed, m, tm, minU) * 3600 * s.feed.currentDepthM(tm)) / h : 1;
        const srcMid = 0.5 * ((src[i - 1] as number) + (src[i] as number));
        const grownH = Math.min((tm - (times[0] as number)) / 3.6e6, s.rGrowthForH ?? 0);
        const rNow = r + (s.rGrowthMmolM2H2 ?? 0) * Math.max(0, grownH);
        // Oxygen cannot go below zero: respiration stops there (the budget's linear demand does not know it).
        o[i] = Math.max(
          0,
          stepBox(o[i - 1] as number, srcMid, kappa * driver, (rNow * O2_MG_L_PER_MMOL_M3) / h, dtH),
        );
      }
    }
    out.set(s.station, o);
  }
  return out;
}

function minOf(o: Float64Array, times: number[]): { v: number; t: number } {
  let k = 0;
  for (let i = 1; i < o.length; i++) if ((o[i] as number) < (o[k] as number)) k = i;
  return { v: o[k] as number, t: times[k] as number };
}

/** Forecasts every station of `models` (in dependency order) for the night from issueMs to endMs. */
export function forecastNight(models: readonly StationModel[], input: NightInput): StationForecast[] {
  const stepMs = (input.stepMin ?? 10) * 60_000;
  const times: number[] = [];
  for (let t = input.issueMs; t < input.endMs; t += stepMs) times.push(t);
  times.push(input.endMs);
  const minU = input.minSpeedMS ?? 0.01;
  const n = input.members ?? 128;
  const dims = 6;
  const z = haltonNormals(n, dims);
  const lnSd = (f: FlowSource) =>
    Math.hypot(
      f.flow.residualSdLn,
      predictFlow(f.flow, input.hm0OffshoreM, f.currentDepthM(input.issueMs)).paramSdLn,
    );
  const flowSd = models.reduce(
    (a, s) =>
      Math.max(a, s.kind === 'transect' ? lnSd(s.flow) : s.kind === 'box' && s.feed ? lnSd(s.feed) : 0),
    0,
  );
  const central = runMember(
    models,
    times,
    { hm0: input.hm0OffshoreM, flowFactor: 1, z: new Float64Array(dims), zi: 0 },
    minU,
  );
  const mins = new Map<string, number[]>(models.map((s) => [s.station, []]));
  for (let j = 0; j < n; j++) {
    const member: Member = {
      hm0: input.hm0OffshoreM * Math.exp(input.hm0LnSigma * (z[j * dims + DIMS.hm0] as number)),
      flowFactor: Math.exp(flowSd * (z[j * dims + DIMS.flow] as number)),
      z,
      zi: j * dims,
    };
    const run = runMember(models, times, member, minU);
    for (const s of models) mins.get(s.station)!.push(minOf(run.get(s.station)!, times).v);
  }
  return models.map((s) => {
    const c = minOf(central.get(s.station)!, times);
    const ms = mins.get(s.station)!;
    return {
      station: s.station,
      kind: s.kind,
      o2MinMgL: c.v,
      tMinMs: c.t,
      loMgL: Math.min(c.v, quantile(ms, 0.1)),
      hiMgL: Math.max(c.v, quantile(ms, 0.9)),
      horizonH: (input.endMs - input.issueMs) / 3.6e6,
    };
  });
}
