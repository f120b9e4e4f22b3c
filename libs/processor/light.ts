// The light beside the metabolism (docs/methods/daily.md 10.2): which PAR sensor is the site's light (the
// `site.par` series), and the PAR of a flux window, at the bed where the transect has an attenuation.
import type { ReefdConfig, TransectConfig } from '../contract/index.js';
import { medianIntervalMs, type Series } from './series.js';
import { windowMean } from '../metabolism/index.js';

const siteSensors = new WeakMap<ReefdConfig, string | undefined>();

/**
 * `station/sensor` of the site's light sensor: the first enabled `par` sensor in the configuration's order.
 * Only it feeds the site's PAR series, so a second PAR sensor (a spare, one under water) never interleaves
 * with it; every PAR sensor still gives its own `light` records.
 */
export function siteLightSensor(config: ReefdConfig): string | undefined {
  if (siteSensors.has(config)) return siteSensors.get(config);
  let found: string | undefined;
  for (const [station, st] of Object.entries(config.stations)) {
    for (const [sensor, s] of Object.entries(st.sensors)) {
      if (s.kind === 'par' && s.enabled && found === undefined) found = `${station}/${sensor}`;
    }
  }
  siteSensors.set(config, found);
  return found;
}

/** Mean PAR of the usable samples in [startMs, endMs), umol m-2 s-1, or null (fewer than half expected). */
export function meanParUmolM2S(par: Series, startMs: number, endMs: number): number | null {
  const interval = medianIntervalMs(par, 15, endMs);
  const expected =
    interval !== undefined && interval > 0 ? Math.max(1, Math.floor((endMs - startMs) / interval)) : 1;
  return windowMean(par.t, par.v, par.f, startMs, endMs, expected).mean;
}

/**
 * PAR of a flux window: the site's mean over the window, or at the bed, PAR exp(-kd h) (Beer-Lambert over the
 * window's mean depth h, m), where the transect has `kd_par_per_m`. Null without light data, or without a depth
 * when an attenuation is configured. Rounded to 0.01 umol m-2 s-1 (stable text; far below any PAR sensor's
 * resolution). Check: 1000 at the surface, kd 0.12 m-1, h 1.5 m gives 835.27 (algebra).
 */
export function windowParUmolM2S(
  tr: TransectConfig,
  surfaceUmolM2S: number | null,
  depthM: number | null | undefined,
): number | null {
  if (surfaceUmolM2S === null || !Number.isFinite(surfaceUmolM2S)) return null;
  let par = Math.max(0, surfaceUmolM2S);
  if (tr.kd_par_per_m !== undefined) {
    if (depthM === null || depthM === undefined || !Number.isFinite(depthM)) return null;
    par *= Math.exp(-tr.kd_par_per_m * Math.max(0, depthM));
  }
  return Math.round(par * 100) / 100;
}
