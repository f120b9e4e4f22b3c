// The daily refit of the forecast's models from the state's own history (docs/methods/forecast.md 11.2-11.4):
// the tide of every station with a depth record, the flow model of every transect, the box of every lagoon
// or pool station. Only data before asOfMs are used, so a refit is the same live and in replay.
import { isSunDown } from '../daily/index.js';
import { blockMeans, valueAt } from './blocks.js';
import { fitBoxModel, type BoxSample } from './box-model.js';
import { fitFlowModel, type FlowSample } from './flow-model.js';
import { fitTide } from './harmonics.js';
import type { ForecastPlan } from './plan.js';
import type { ForecastState, ModelFits } from './state.js';

export interface RefitOptions {
  /** Days of ensembles for the flow model (default 7) and of nights for the box (default 7). */
  flowDays: number;
  boxDays: number;
  tideDays: number;
}

const DAY = 86_400_000;

export function refitModels(
  s: ForecastState,
  plan: ForecastPlan,
  asOfMs: number,
  o: RefitOptions,
): ModelFits {
  const fits: ModelFits = { fittedAtMs: asOfMs, tide: {}, flow: {}, box: {} };
  for (const [station, b] of Object.entries(s.depth)) {
    const m = blockMeans(b, asOfMs - o.tideDays * DAY, asOfMs);
    const f = fitTide(m.tMs, m.v, { maxRecordDays: o.tideDays });
    fits.tide[station] = f.ok ? f : null;
  }
  for (const t of plan.transects) {
    const f = fitFlowModel(flowSamples(s, t.id, asOfMs, o.flowDays), asOfMs);
    fits.flow[t.id] = f.ok ? f : null;
  }
  for (const p of plan.stations) {
    if (p.kind !== 'box') continue;
    const f = fitBoxModel(boxNights(s, plan, p, asOfMs, o.boxDays));
    fits.box[p.station] = f.ok ? f : null;
  }
  return fits;
}

/** The flow model's data: 15-minute means of the valid ensembles of the last days, each with the depth there
 * and the offshore Hm0 interpolated to its time. */
function flowSamples(s: ForecastState, transect: string, asOfMs: number, days: number): FlowSample[] {
  const u = s.flowU[transect];
  const h = s.flowDepth[transect];
  if (!u || !h) return [];
  const m = blockMeans(u, asOfMs - days * DAY, asOfMs);
  const out: FlowSample[] = [];
  m.tMs.forEach((t, i) => {
    const depthM = valueAt(h, t, 3_600_000, asOfMs);
    const hm0OffshoreM = valueAt(s.offshore, t, 3 * 3_600_000, asOfMs);
    if (depthM !== undefined && hm0OffshoreM !== undefined)
      out.push({ tMs: t, uMS: m.v[i] as number, hm0OffshoreM, depthM });
  });
  return out;
}

/** The box's night history: consecutive night blocks with the box O2, the source O2, the box depth and the
 * flushing driver q/h_box (m/h) from the feeding transect's measured flow. */
function boxNights(
  s: ForecastState,
  plan: ForecastPlan,
  p: { station: string; source: string; feed: string },
  asOfMs: number,
  days: number,
): BoxSample[][] {
  const box = s.o2[p.station];
  const src = s.o2[p.source];
  const depth = s.depth[p.station];
  const u = s.flowU[p.feed];
  const hc = s.flowDepth[p.feed];
  if (!box || !src || !depth || !u || !hc) return [];
  const m = blockMeans(box, asOfMs - days * DAY, asOfMs);
  const nights: BoxSample[][] = [];
  let cur: BoxSample[] = [];
  let lastT = -Infinity;
  for (let i = 0; i < m.tMs.length; i++) {
    const t = m.tMs[i] as number;
    const dark = isSunDown(t, plan.latDeg, plan.lonDeg);
    const o2Src = valueAt(src, t, 3_600_000, asOfMs);
    const h = valueAt(depth, t, 3_600_000, asOfMs);
    const uc = valueAt(u, t, 3_600_000, asOfMs);
    const dc = valueAt(hc, t, 3_600_000, asOfMs);
    const ok =
      dark && o2Src !== undefined && h !== undefined && uc !== undefined && dc !== undefined && uc > 0;
    if (!ok || t - lastT > 45 * 60_000) {
      if (cur.length > 1) nights.push(cur);
      cur = [];
    }
    if (ok) {
      cur.push({
        tMs: t,
        o2MgL: m.v[i] as number,
        o2SourceMgL: o2Src,
        depthM: h,
        driver: (uc * 3600 * dc) / h,
      });
      lastT = t;
    }
  }
  if (cur.length > 1) nights.push(cur);
  return nights;
}
