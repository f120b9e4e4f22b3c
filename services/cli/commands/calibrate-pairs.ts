// The bottles and sensor readings `reefd calibrate` fits (docs/methods/calibration.md 13.3-13.5): the archive
// run through the processor once, so the optode's O2 in umol/kg and the CTD temperature are the ones the
// pipeline derives; each bottle is paired with the median of the sensor's readings within the match window
// of its time. Readings the logbook excludes, and failed readings, are paired with no bottle.
import { type DerivedRecord, type ReefdConfig, type SensorMessage } from '../../../libs/contract/index.js';
import { medianWithin, pco2Reference, type FitTarget, type Pair } from '../../../libs/calibration/index.js';
import { exclusionAt, type ExclusionIndex } from '../../../libs/logbook/index.js';
import {
  createProcessor,
  messageFromArchiveLine,
  type ProcessorOptions,
} from '../../../libs/processor/index.js';
import { readArchiveOrdered } from '../../replay/ordered.js';

interface Series {
  t: number[];
  v: number[];
}
const push = (m: Map<string, Series>, key: string, t: number, v: number) => {
  let s = m.get(key);
  if (s === undefined) {
    s = { t: [], v: [] };
    m.set(key, s);
  }
  s.t.push(t);
  s.v.push(v);
};

interface Bottle {
  station: string;
  tMs: number;
  ta?: number;
  dic?: number;
  o2?: number;
  sal?: number;
}

export interface Collected {
  pco2: Map<string, Series>;
  pco2Temp: Map<string, Series>;
  /** CTD temperature and salinity at each pCO2 reading, from the carbonate records. */
  ctdTemp: Map<string, Series>;
  ctdSal: Map<string, Series>;
  o2: Map<string, Series>;
  /** The O2 field each optode reports (the one the processor reads first). */
  o2Field: Map<string, string>;
  bottles: Bottle[];
}

function sortSeries(m: Map<string, Series>): void {
  for (const s of m.values()) {
    const idx = s.t.map((_, i) => i).sort((a, b) => (s.t[a] as number) - (s.t[b] as number));
    s.t = idx.map((i) => s.t[i] as number);
    s.v = idx.map((i) => s.v[i] as number);
  }
}

export async function collect(
  config: ReefdConfig,
  input: string,
  options: ProcessorOptions,
  excluded: ExclusionIndex,
): Promise<Collected> {
  const c: Collected = {
    pco2: new Map(),
    pco2Temp: new Map(),
    ctdTemp: new Map(),
    ctdSal: new Map(),
    o2: new Map(),
    o2Field: new Map(),
    bottles: [],
  };
  const processor = createProcessor(config, undefined, options);
  const onRecords = (records: readonly DerivedRecord[]) => {
    for (const r of records) {
      if ((r as { flag?: unknown }).flag === 4) continue; // a failed or excluded reading pairs with no bottle
      const key = `${String(r.station ?? '')}/${String((r as { sensor?: unknown }).sensor ?? '')}`;
      const tMs = Date.parse(r.t);
      if (r.type === 'oxygen' && typeof r.o2_umol_kg === 'number') push(c.o2, key, tMs, r.o2_umol_kg);
      if (r.type === 'carbonate') {
        const x = r as { temp_c?: unknown; sal?: unknown };
        if (typeof x.temp_c === 'number') push(c.ctdTemp, key, tMs, x.temp_c);
        if (typeof x.sal === 'number') push(c.ctdSal, key, tMs, x.sal);
      }
    }
  };
  const stream = readArchiveOrdered(input, {
    topicPrefix: config.topic_prefix,
    latenessMs: config.processing.lateness_min * 60_000,
  });
  for await (const e of stream) {
    if (e.line === null) continue;
    const m = messageFromArchiveLine(config, e.line);
    if (!m.ok) continue;
    if (exclusionAt(excluded, m.message.station, m.message.sensor, m.message.tMs) === undefined)
      note(c, m.message);
    onRecords(processor.push(m.message, m.rxMs).records);
  }
  onRecords(processor.drain());
  for (const m of [c.pco2, c.pco2Temp, c.ctdTemp, c.ctdSal, c.o2]) sortSeries(m);
  return c;
}

function note(c: Collected, m: SensorMessage): void {
  const key = `${m.station}/${m.sensor}`;
  if (m.kind === 'pco2') {
    push(c.pco2, key, m.tMs, m.pco2_uatm);
    if (m.temp_c !== undefined) push(c.pco2Temp, key, m.tMs, m.temp_c);
  } else if (m.kind === 'oxygen' && !c.o2Field.has(key)) {
    c.o2Field.set(
      key,
      m.o2_umol_l !== undefined ? 'o2_umol_l' : m.o2_mg_l !== undefined ? 'o2_mg_l' : 'o2_sat_pct',
    );
  } else if (m.kind === 'sample') {
    const b: Bottle = { station: m.station, tMs: m.tMs };
    if (m.ta_umol_kg !== undefined) b.ta = m.ta_umol_kg;
    if (m.dic_umol_kg !== undefined) b.dic = m.dic_umol_kg;
    if (m.o2_umol_kg !== undefined) b.o2 = m.o2_umol_kg;
    if (m.sal !== undefined) b.sal = m.sal;
    c.bottles.push(b);
  }
}

export interface Job {
  sensor: string;
  field: string;
  kind: 'pco2' | 'oxygen';
  target: FitTarget;
  pairs: Pair[];
  unpaired: number;
}

type CarbonateConstants = Parameters<typeof pco2Reference>[2];

/** One fit to run: a pCO2 sensor or an optode with bottles at its station, and the pairs found. */
export function jobs(config: ReefdConfig, c: Collected, windowMs: number, only: readonly string[]): Job[] {
  const out: Job[] = [];
  const opts = {
    carbonicConstants: config.carbonate.carbonic_constants,
    boron: config.carbonate.boron,
  } as const;
  for (const [station, st] of Object.entries(config.stations)) {
    for (const [id, sc] of Object.entries(st.sensors)) {
      const sensor = `${station}/${id}`;
      if (only.length > 0 && !only.includes(sensor)) continue;
      if (sc.kind !== 'pco2' && sc.kind !== 'oxygen') continue;
      const readings = sc.kind === 'pco2' ? c.pco2.get(sensor) : c.o2.get(sensor);
      if (readings === undefined || readings.t.length === 0) continue;
      const bottles = c.bottles.filter(
        (b) =>
          b.station === station &&
          (sc.kind === 'pco2' ? b.ta !== undefined && b.dic !== undefined : b.o2 !== undefined),
      );
      const { pairs, unpaired } = pairBottles(c, sensor, sc.kind, readings, bottles, windowMs, opts);
      if (bottles.length === 0) continue;
      out.push({
        sensor,
        field: sc.kind === 'pco2' ? 'pco2_uatm' : (c.o2Field.get(sensor) ?? 'o2_umol_l'),
        kind: sc.kind,
        target: {
          sensor,
          field: '',
          fromMs: readings.t[0] as number,
          toMs: readings.t[readings.t.length - 1] as number,
        },
        pairs,
        unpaired,
      });
    }
  }
  for (const j of out) j.target.field = j.field;
  return out;
}

/** Each bottle with the sensor's median reading near its time; a bottle with no reading is counted unpaired. */
function pairBottles(
  c: Collected,
  sensor: string,
  kind: 'pco2' | 'oxygen',
  readings: Series,
  bottles: readonly Bottle[],
  windowMs: number,
  opts: CarbonateConstants,
): { pairs: Pair[]; unpaired: number } {
  const pairs: Pair[] = [];
  let unpaired = 0;
  for (const b of bottles) {
    const raw = medianWithin(readings.t, readings.v, b.tMs, windowMs);
    if (raw === undefined) {
      unpaired++;
      continue;
    }
    if (kind === 'oxygen') {
      pairs.push({ tMs: b.tMs, raw, reference: b.o2 as number });
      continue;
    }
    const ref = bottlePco2(c, sensor, b, windowMs, opts);
    if (ref === undefined) unpaired++;
    else pairs.push({ tMs: b.tMs, raw, reference: ref });
  }
  return { pairs, unpaired };
}

/**
 * pCO2 from the bottle's TA and DIC at the sensor's temperature (its own, else the CTD's at the station) and
 * the bottle's salinity (else the CTD's), or undefined when a temperature or salinity is missing.
 */
function bottlePco2(
  c: Collected,
  sensor: string,
  b: Bottle,
  windowMs: number,
  opts: CarbonateConstants,
): number | undefined {
  const own = c.pco2Temp.get(sensor);
  const ctdT = c.ctdTemp.get(sensor);
  const temp =
    (own ? medianWithin(own.t, own.v, b.tMs, windowMs) : undefined) ??
    (ctdT ? medianWithin(ctdT.t, ctdT.v, b.tMs, windowMs) : undefined);
  const ctdS = c.ctdSal.get(sensor);
  const sal = b.sal ?? (ctdS ? medianWithin(ctdS.t, ctdS.v, b.tMs, windowMs) : undefined);
  return temp !== undefined && sal !== undefined
    ? pco2Reference({ taUmolKg: b.ta as number, dicUmolKg: b.dic as number, salinity: sal }, temp, opts)
    : undefined;
}
