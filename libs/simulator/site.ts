// The fictional reef's layout: which role each configured station plays, its bed elevation, and the
// distances along the flow path. Roles come from the station id, then from words in its label.
import type { ReefdConfig } from '../contract/index.js';

export const ROLES = ['fore', 'crest', 'flat', 'back', 'lagoon', 'channel', 'mast'] as const;
export type Role = (typeof ROLES)[number];

/** Bed elevation (m relative to mean sea level) of each role on Ornen Reef (fictional). */
export const BED_ELEVATION_M: Readonly<Record<Role, number>> = Object.freeze({
  fore: -12,
  crest: -0.95,
  flat: -1.15,
  back: -1.45,
  lagoon: -3.6,
  channel: -6,
  mast: 0,
});

const LABEL_WORDS: ReadonlyArray<[RegExp, Role]> = [
  [/fore|slope|outer/i, 'fore'],
  [/crest|edge/i, 'crest'],
  [/back/i, 'back'],
  [/flat/i, 'flat'],
  [/lagoon/i, 'lagoon'],
  [/channel|pass/i, 'channel'],
  [/mast|weather|met/i, 'mast'],
];

export function roleOf(stationId: string, label?: string): Role {
  if ((ROLES as readonly string[]).includes(stationId)) return stationId as Role;
  for (const [re, role] of LABEL_WORDS) if (re.test(stationId) || (label && re.test(label))) return role;
  return 'flat';
}

export interface SiteLayout {
  site: string;
  prefix: string;
  latDeg: number;
  lonDeg: number;
  reefAxisDeg: number;
  roleOf: ReadonlyMap<string, Role>;
  /** Flow-path distances, m: reef front to crest, crest to flat, flat to back reef. */
  frontToCrestM: number;
  crestToFlatM: number;
  flatToBackM: number;
}

function distanceM(a: { lat: number; lon: number }, b: { lat: number; lon: number }): number {
  const r = 6371000; // m, mean Earth radius
  const lat = ((a.lat + b.lat) / 2) * (Math.PI / 180);
  const dx = ((b.lon - a.lon) * Math.PI * r * Math.cos(lat)) / 180;
  const dy = ((b.lat - a.lat) * Math.PI * r) / 180;
  return Math.hypot(dx, dy);
}

export function siteLayout(config: ReefdConfig): SiteLayout {
  const roles = new Map<string, Role>();
  for (const [id, st] of Object.entries(config.stations)) roles.set(id, roleOf(id, st.label));
  const byRole = (r: Role) => [...roles].find(([, role]) => role === r)?.[0];
  const segment = (up: Role, down: Role, fallback: number): number => {
    const u = byRole(up);
    const d = byRole(down);
    if (u === undefined || d === undefined) return fallback;
    const tr = Object.values(config.transects).find((t) => t.upstream === u && t.downstream === d);
    if (tr) return tr.length_m;
    const pu = config.stations[u]?.position;
    const pd = config.stations[d]?.position;
    return pu && pd ? Math.max(20, distanceM(pu, pd)) : fallback;
  };
  const positions = Object.values(config.stations).flatMap((s) => (s.position ? [s.position] : []));
  const mean = (xs: number[], fb: number) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : fb);
  return {
    site: config.site,
    prefix: config.topic_prefix,
    latDeg:
      config.latitude_deg ??
      mean(
        positions.map((p) => p.lat),
        8,
      ),
    lonDeg: mean(
      positions.map((p) => p.lon),
      -145,
    ),
    reefAxisDeg: config.reef_axis_deg,
    roleOf: roles,
    frontToCrestM: 250,
    crestToFlatM: segment('crest', 'flat', 180),
    flatToBackM: segment('flat', 'back', 170),
  };
}
