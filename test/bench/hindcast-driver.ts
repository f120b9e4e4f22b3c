// The hindcast scoring shared by the forecast benchmark: pairs every `forecast` record the processor wrote with
// the simulator's true oxygen of its station between the issue time and sunrise (the night the forecast is
// about). Pure apart from the inputs it is given.
import type { DerivedRecord } from '../../libs/contract/index.js';

export interface TruthO2 {
  t: string;
  station: string;
  o2_mg_l: number;
}

export interface ScoredForecast {
  station: string;
  model: string;
  issueMs: number;
  sunriseMs: number;
  lead: number;
  central: number;
  lo: number;
  hi: number;
  truthMin: number;
  /** Persistence baseline: the station's O2 at the issue time (truth). */
  persistence: number;
}

interface ForecastFields {
  station: string;
  t: string;
  sunrise: string;
  model: string;
  lead_h: number;
  o2_min_mg_l: number;
  o2_min_lo_mg_l: number;
  o2_min_hi_mg_l: number;
}

/** Every forecast record of `records` scored against the truth of its night (3 truth rows at least). */
export function scoreForecasts(
  records: readonly DerivedRecord[],
  truth: readonly TruthO2[],
): ScoredForecast[] {
  const byStation = new Map<string, { tMs: number; v: number }[]>();
  for (const t of truth) {
    const rows = byStation.get(t.station) ?? [];
    rows.push({ tMs: Date.parse(t.t), v: t.o2_mg_l });
    byStation.set(t.station, rows);
  }
  const scored: ScoredForecast[] = [];
  for (const r of records) {
    if (r.type !== 'forecast') continue;
    const f = r as unknown as ForecastFields;
    const issue = Date.parse(f.t);
    const sunrise = Date.parse(f.sunrise);
    const rows = (byStation.get(f.station) ?? []).filter((x) => x.tMs >= issue && x.tMs <= sunrise);
    if (rows.length < 3) continue;
    scored.push({
      station: f.station,
      model: f.model,
      issueMs: issue,
      sunriseMs: sunrise,
      lead: f.lead_h,
      central: f.o2_min_mg_l,
      lo: f.o2_min_lo_mg_l,
      hi: f.o2_min_hi_mg_l,
      truthMin: Math.min(...rows.map((x) => x.v)),
      persistence: rows[0]!.v,
    });
  }
  return scored;
}
