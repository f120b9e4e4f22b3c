// Large fictional deployments for the benchmarks, built from the demo site (deploy/demo/ornen-reef.yaml):
// `copies` of its seven stations and two transects under suffixed ids (a realistic mix of kinds), or
// `n` stations of a few sensors each (ctd, oxygen, pco2).
import type { ReefdConfig } from '../../../libs/contract/index.js';
import { demoYaml, parsedConfig } from './reefd.js';

type Yaml = Record<string, unknown>;

/** The demo site's stations and transects `copies` times (ids `<id>-kNNN`), as YAML-shaped config. */
export function replicatedDemo(copies: number, extra: Yaml = {}): Yaml {
  const demo = demoYaml();
  const stations: Yaml = {};
  const transects: Yaml = {};
  const tag = (id: string, k: number) => `${id}-k${String(k).padStart(3, '0')}`;
  for (let k = 0; k < copies; k++) {
    for (const [id, st] of Object.entries(demo.stations as Record<string, { sensors: Yaml }>)) {
      const sensors: Yaml = {};
      for (const [sid, s] of Object.entries(st.sensors)) sensors[tag(sid, k)] = s;
      stations[tag(id, k)] = { ...st, sensors };
    }
    for (const [id, tr] of Object.entries(
      demo.transects as Record<string, { upstream: string; downstream: string; current: string }>,
    ))
      transects[tag(id, k)] = {
        ...tr,
        upstream: tag(tr.upstream, k),
        downstream: tag(tr.downstream, k),
        current: tag(tr.current, k),
      };
  }
  return { ...demo, stations, transects, ...extra };
}

/** `n` stations of three sensors each (CTD, optode, pCO2), no transects. */
export function manyStations(n: number, extra: Yaml = {}): Yaml {
  const demo = demoYaml();
  const stations: Yaml = {};
  for (let i = 0; i < n; i++) {
    const id = `flat-${String(i).padStart(4, '0')}`;
    stations[id] = {
      sensors: {
        [`ctd-${i}`]: { kind: 'ctd' },
        [`o2-${i}`]: { kind: 'oxygen' },
        [`co2-${i}`]: { kind: 'pco2' },
      },
    };
  }
  return { ...demo, stations, transects: {}, ...extra };
}

export function parsed(cfg: Yaml): ReefdConfig {
  return parsedConfig(cfg);
}
