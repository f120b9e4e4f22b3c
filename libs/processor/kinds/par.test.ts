// The par kind: one `light` record per PAR sample (contract-ext E3), with the QC flag of the sample, in
// every output's terms (schema, tags, line protocol), and the site series the metabolism reads.
import { describe, expect, it } from 'vitest';
import {
  derivedRecordSchema,
  parseConfigText,
  parseMessage,
  recordKey,
  recordTags,
  type DerivedRecord,
  type SensorMessage,
} from '../../contract/index.js';
import { recordToLine } from '../../lineproto/index.js';
import { createProcessor } from '../index.js';

const CONFIG = `
site: light-reef
reef_axis_deg: 270
stations:
  flat:
    sensors:
      ctd: { kind: ctd }
      par1: { kind: par }
      par2: { kind: par }
alerts:
  rules:
    bright:
      metric: light.par_umol_m2_s
      above: 2000
      clear: 1800
`;

const parsed = parseConfigText(CONFIG);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config = parsed.config;
const T0 = Date.UTC(2026, 2, 1, 0, 0, 0);
const MIN = 60_000;

function par(sensor: string, tMs: number, value: number): SensorMessage {
  const r = parseMessage(
    `reef/light-reef/flat/par/${sensor}`,
    JSON.stringify({ v: 1, t: new Date(tMs).toISOString(), par_umol_m2_s: value }),
  );
  if (!r.ok) throw new Error(r.reason);
  return r.message;
}

/** PAR values of a morning, umol m-2 s-1, one a minute; the 30th is above the user range (2500: flag 3). */
const VALUES = Array.from({ length: 40 }, (_, i) => (i === 30 ? 2700 : 20 * i));

function run() {
  const p = createProcessor(config);
  const records: DerivedRecord[] = [];
  VALUES.forEach((v, i) => {
    const t = T0 + i * MIN;
    records.push(...p.push(par('par1', t, v), t + 500).records);
    records.push(...p.push(par('par2', t, v / 2), t + 500).records);
  });
  records.push(...p.drain());
  return { p, records };
}

describe('light records from par sensors', () => {
  const { p, records } = run();
  const light = records.filter((r) => r.type === 'light');

  it('emits one per sample and sensor, with the sample value, time and sensor', () => {
    expect(light.length).toBe(2 * VALUES.length);
    const one = light.filter((r) => r.sensor === 'par1');
    expect(one.map((r) => r.par_umol_m2_s)).toEqual(VALUES);
    expect(one.map((r) => Date.parse(r.t))).toEqual(VALUES.map((_, i) => T0 + i * MIN));
    expect(light.filter((r) => r.sensor === 'par2').map((r) => r.par_umol_m2_s)).toEqual(
      VALUES.map((v) => v / 2),
    );
    expect(p.counters().records.light).toBe(2 * VALUES.length);
  });

  it('carries the QC flag of the sample: 3 above the user range (docs/methods/qc.md 7.3), else 1', () => {
    const one = light.filter((r) => r.sensor === 'par1');
    expect(one[30]?.flag).toBe(3);
    // PAR has no spike, rate-of-change or flat-line test in the defaults (night is a legitimate flat zero).
    expect(one.filter((_, i) => i !== 30).every((r) => r.flag === 1)).toBe(true);
  });

  it('is a valid contract record with the station tags, one series per sensor', () => {
    for (const r of light) expect(derivedRecordSchema.safeParse(r).success).toBe(true);
    const r = light[0] as DerivedRecord;
    expect(recordTags(r)).toEqual({ site: 'light-reef', station: 'flat', sensor: 'par1' });
    expect(recordKey(r)).not.toBe(recordKey(light[1] as DerivedRecord));
    const line = recordToLine(r, 'v2');
    expect(line).toEqual({
      ok: true,
      line: `light,sensor=par1,site=light-reef,station=flat par_umol_m2_s=0,flag=1 ${T0}`,
    });
  });

  it('feeds its fields to the alert engine: a rule on light.par_umol_m2_s raises and clears', () => {
    const alerts = records.filter((r) => r.type === 'alert' && r.rule === 'bright');
    // par1 crosses 2000 at the 30th sample (2700) and falls to 620 at the next; par2 never does.
    expect(alerts.map((a) => [a.state, a.sensor, a.t])).toEqual([
      ['raised', 'par1', new Date(T0 + 30 * MIN).toISOString()],
      ['cleared', 'par1', new Date(T0 + 31 * MIN).toISOString()],
    ]);
  });

  it("keeps the site light sensor's samples in the site PAR series of the checkpoint", () => {
    const s = p.snapshot().site.par;
    // The first PAR sensor of the configuration is the site's light (light.ts): the second, reporting at the
    // same times, never overwrites it.
    expect(s.t.length).toBe(VALUES.length);
    expect(s.v).toEqual(VALUES);
  });

  it('notes the worst flag of the last message as the sensor health', () => {
    const h = p.sensorHealth().find((x) => x.sensor === 'par1');
    expect(h).toMatchObject({ kind: 'par', flag: 1, lastSeenMs: T0 + 39 * MIN });
  });
});
