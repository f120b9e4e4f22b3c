// What a late lab result can change, so a re-derivation (revise.ts) keeps and replays that part of the site
// only: the stations with a bottle sampler, the transects that have one at either end with all of their
// stations, the stations of the sensors that write site-wide series (the met mast's barometer enters every
// carbonate record), and the outermost pressure station when a transect may run on modelled flow (its waves
// drive the flow model, forecast-step.ts). Records of a station depend on that station's series and the site's; records of a
// transect on its stations' and the site's: so a processor of this part gives the same records for it as the
// whole site's processor. Other stations' messages only move its clock (revise.ts). A site without bottle
// samplers has no scope, and then no re-derivation and no cost.
import type { Kind, ReefdConfig } from '../contract/index.js';
import { planFromConfig } from '../forecast/index.js';
import type { KindTable } from './kinds/index.js';
import type { ProcessorState } from './state.js';

/** The kind of the lab results a re-derivation is for. */
const LAB_KIND: Kind = 'sample';

export interface ReviseScope {
  /** The configuration of the scope alone (its stations and transects). */
  readonly config: ReefdConfig;
  readonly stations: ReadonlySet<string>;
  readonly transects: ReadonlySet<string>;
}

export function reviseScope(config: ReefdConfig, kinds: KindTable): ReviseScope | undefined {
  const kindsAt = (id: string): Kind[] =>
    Object.values(config.stations[id]?.sensors ?? {}).map((s) => s.kind);
  const labs = Object.keys(config.stations).filter((id) => kindsAt(id).includes(LAB_KIND));
  if (labs.length === 0) return undefined;
  const stations = new Set(labs);
  const transects = new Set<string>();
  for (const [id, tr] of Object.entries(config.transects)) {
    if (!stations.has(tr.upstream) && !stations.has(tr.downstream)) continue;
    transects.add(id);
  }
  for (const id of transects) {
    const tr = config.transects[id];
    if (tr !== undefined) for (const s of [tr.upstream, tr.downstream, tr.current]) stations.add(s);
  }
  for (const id of Object.keys(config.stations))
    if (kindsAt(id).some((k) => kinds[k].writes.site.length > 0)) stations.add(id);
  // Windows on modelled flow read the offshore waves of the outermost pressure station (forecast-step.ts).
  const offshore = planFromConfig(config).offshoreStation;
  if (
    offshore !== undefined &&
    [...transects].some((id) => (config.transects[id]?.modelled_flow_max_h ?? 0) > 0)
  )
    stations.add(offshore);
  const scoped: ReefdConfig = {
    ...config,
    stations: Object.fromEntries(Object.entries(config.stations).filter(([id]) => stations.has(id))),
    transects: Object.fromEntries(Object.entries(config.transects).filter(([id]) => transects.has(id))),
  };
  return { config: scoped, stations, transects };
}

const stationOfKey = (key: string): string => key.slice(0, key.indexOf('/'));

function pick<T>(rec: Record<string, T>, keep: (key: string) => boolean): Record<string, T> {
  const out: Record<string, T> = {};
  for (const [k, v] of Object.entries(rec)) if (keep(k)) out[k] = v;
  return out;
}

/**
 * A deep copy of the scope's part of the state: its stations, sensors, QC states, transects, held messages and
 * windows, the site series and the clock. The alert engine is left out (a re-derivation sends no alerts), and parts of
 * the state this module does not know are copied whole.
 */
export function scopedState(state: ProcessorState, scope: ReviseScope): ProcessorState {
  const inScope = (key: string) => scope.stations.has(stationOfKey(key));
  return structuredClone({
    ...state,
    stations: pick(state.stations, (id) => scope.stations.has(id)),
    sensors: pick(state.sensors, inScope),
    qc: pick(state.qc, inScope),
    transects: pick(state.transects, (id) => scope.transects.has(id)),
    held: state.held.filter((h) => scope.stations.has(h.message.station)),
    heldWindows: state.heldWindows.filter((w) => scope.transects.has(w.transect)),
    alerts: undefined,
    reprocess: { ...state.reprocess, revisions: {}, pending: [] },
  });
}

/**
 * The live state takes the re-derived scope's series, pCO2 warm starts and flux results, so its later records
 * continue from the revised ones. Everything else stays the live run's (duplicate detection, QC, alerts).
 */
export function adoptScoped(live: ProcessorState, scratch: ProcessorState, scope: ReviseScope): void {
  for (const id of scope.stations) {
    const st = scratch.stations[id];
    if (st !== undefined) live.stations[id] = st;
  }
  for (const [key, s] of Object.entries(scratch.sensors)) {
    const l = live.sensors[key];
    if (l !== undefined && s.lastPh !== undefined) l.lastPh = s.lastPh;
  }
  for (const id of scope.transects) {
    const t = scratch.transects[id];
    if (t !== undefined) live.transects[id] = t;
    // The days of its transects too (daily-step.ts), with the revised windows.
    const d = scratch.daily[id];
    if (d !== undefined) live.daily[id] = d;
  }
}
