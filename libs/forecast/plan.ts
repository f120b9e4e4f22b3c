// Which model forecasts each oxygen station, from the site configuration (docs/methods/forecast.md 11.1):
// - the downstream station of a transect: the transect model (upstream O2 less respiration over the transit);
// - a station only ever upstream: persistence (it is the first on the flow path);
// - any other oxygen station (a lagoon, a pool): a one-box budget whose source is the downstream station of
//   the nearest transect, flushed by that transect's flow.
// The offshore wave height comes from the outermost pressure station: the one farthest seaward along the reef
// axis (positions), else the upstream station of the first transect that has a pressure sensor.
import type { ReefdConfig } from '../contract/index.js';

export interface PlanTransect {
  id: string;
  upstream: string;
  downstream: string;
  current: string;
  lengthM: number;
  bearingDeg: number;
}

export type PlanStation =
  | { station: string; kind: 'persistence' }
  | { station: string; kind: 'transect'; transect: string }
  | { station: string; kind: 'box'; source: string; feed: string };

export interface ForecastPlan {
  site: string;
  latDeg: number;
  lonDeg: number;
  offshoreStation: string | undefined;
  transects: PlanTransect[];
  /** In dependency order: every upstream and source comes before the stations it drives. */
  stations: PlanStation[];
}

function distanceM(a: { lat: number; lon: number }, b: { lat: number; lon: number }): number {
  const lat = (((a.lat + b.lat) / 2) * Math.PI) / 180;
  const dx = ((b.lon - a.lon) * Math.PI * 6371000 * Math.cos(lat)) / 180; // m, mean Earth radius
  const dy = ((b.lat - a.lat) * Math.PI * 6371000) / 180;
  return Math.hypot(dx, dy);
}

export function planFromConfig(config: ReefdConfig): ForecastPlan {
  const st = config.stations;
  const has = (id: string, kind: string) =>
    Object.values(st[id]?.sensors ?? {}).some((s) => s.kind === kind && s.enabled);
  const transects: PlanTransect[] = Object.entries(config.transects).map(([id, t]) => ({
    id,
    upstream: t.upstream,
    downstream: t.downstream,
    current: t.current,
    lengthM: t.length_m,
    bearingDeg: t.bearing_deg ?? config.reef_axis_deg,
  }));
  const positions = Object.values(st).flatMap((s) => (s.position ? [s.position] : []));
  const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
  const latDeg = config.latitude_deg ?? (positions.length ? mean(positions.map((p) => p.lat)) : NaN);
  const lonDeg = positions.length ? mean(positions.map((p) => p.lon)) : NaN;
  // Seaward = against the shoreward reef axis.
  const axis = (config.reef_axis_deg * Math.PI) / 180;
  const shoreward = (p: { lat: number; lon: number }) =>
    p.lon * Math.cos((p.lat * Math.PI) / 180) * Math.sin(axis) + p.lat * Math.cos(axis);
  const withP = Object.keys(st).filter((id) => has(id, 'pressure'));
  const placed = withP.filter((id) => st[id]?.position);
  const offshoreStation = placed.length
    ? placed.reduce((a, b) => (shoreward(st[b]!.position!) < shoreward(st[a]!.position!) ? b : a))
    : transects.map((t) => t.upstream).find((id) => withP.includes(id));

  const o2 = Object.keys(st).filter((id) => has(id, 'oxygen'));
  const out: PlanStation[] = [];
  const done = new Set<string>();
  const downOf = new Map(transects.map((t) => [t.downstream, t] as const));
  for (const id of o2.filter((s) => !downOf.has(s) && transects.some((t) => t.upstream === s))) {
    out.push({ station: id, kind: 'persistence' });
    done.add(id);
  }
  // Transect chains: a downstream station whose upstream is already forecast, until none is left.
  for (let added = true; added;) {
    added = false;
    for (const t of transects) {
      if (!done.has(t.downstream) && done.has(t.upstream) && o2.includes(t.downstream)) {
        out.push({ station: t.downstream, kind: 'transect', transect: t.id });
        done.add(t.downstream);
        added = true;
      }
    }
  }
  for (const id of o2.filter((s) => !done.has(s) && !downOf.has(s))) {
    const p = st[id]?.position;
    const feeds = transects.filter((t) => done.has(t.downstream));
    if (feeds.length === 0) continue;
    const near = p
      ? feeds.reduce((a, b) => {
          const pa = st[a.downstream]?.position;
          const pb = st[b.downstream]?.position;
          return pa && pb && distanceM(p, pb) < distanceM(p, pa) ? b : a;
        })
      : (feeds[feeds.length - 1] as PlanTransect);
    out.push({ station: id, kind: 'box', source: near.downstream, feed: near.id });
    done.add(id);
  }
  return { site: config.site, latDeg, lonDeg, offshoreStation, transects, stations: out };
}
