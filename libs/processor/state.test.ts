// Checkpoint compatibility: a checkpoint written before a series (or a station) was added resumes with the
// new series empty, with no STATE_VERSION bump; a checkpoint of another version is a cold start.
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type SensorMessage } from '../contract/index.js';
import { createProcessor, STATE_VERSION, type ProcessorState } from './index.js';

const parsed = parseConfigText(`
site: state-reef
reef_axis_deg: 270
stations:
  crest:
    sensors:
      ctd: { kind: ctd }
  mast:
    sensors:
      met: { kind: met }
`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;
const T0 = Date.UTC(2026, 2, 1);
const MIN = 60_000;

function msg(topic: string, tMs: number, body: Record<string, unknown>): SensorMessage {
  const r = parseMessage(
    `reef/state-reef/${topic}`,
    JSON.stringify({ v: 1, t: new Date(tMs).toISOString(), ...body }),
  );
  if (!r.ok) throw new Error(r.reason);
  return r.message;
}

/** A checkpoint after one CTD and one met message, as JSON (what the daemon writes). */
function checkpoint(): ProcessorState {
  const p = createProcessor(config);
  p.push(msg('crest/ctd/ctd', T0, { temp_c: 27, sal: 35 }), T0);
  p.push(msg('mast/met/met', T0, { wind_m_s: 3, baro_hpa: 1010 }), T0);
  return JSON.parse(JSON.stringify(p.snapshot())) as ProcessorState;
}

describe('restoring a checkpoint', () => {
  it('adds series and stations the checkpoint does not have, empty, and keeps the rest', () => {
    const old = checkpoint();
    // As written by a build without the `sal` station series, the `baro` site series, or the mast station.
    delete (old.stations.crest as Partial<ProcessorState['stations'][string]>).sal;
    delete (old.site as Partial<ProcessorState['site']>).baro;
    delete old.stations.mast;
    const p = createProcessor(config, old);
    const t1 = T0 + 5 * MIN;
    expect(p.push(msg('crest/ctd/ctd', t1, { temp_c: 27.5, sal: 34.9 }), t1).status).toBe('ok');
    expect(p.push(msg('mast/met/met', t1, { wind_m_s: 4, baro_hpa: 1011 }), t1).status).toBe('ok');
    const s = p.snapshot();
    expect(s.stations.crest?.temp.v).toEqual([27, 27.5]);
    expect(s.stations.crest?.sal.v).toEqual([34.9]);
    expect(s.site.baro.v).toEqual([1011]);
    expect(s.site.wind.v).toEqual([3, 4]);
    expect(Object.keys(s.stations).sort()).toEqual(['crest', 'mast']);
    expect(s.counters.accepted).toBe(4);
  });

  it('starts cold from a checkpoint of another version', () => {
    const old = { ...checkpoint(), version: STATE_VERSION - 1 };
    const p = createProcessor(config, old);
    expect(p.counters().accepted).toBe(0);
    expect(p.snapshot().stations.crest?.temp.v).toEqual([]);
  });
});
