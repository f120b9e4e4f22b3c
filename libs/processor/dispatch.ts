// Derives one message through its kind's module (kinds/): binds the message to a KindIO, checks the battery
// (every kind), runs the module's `derive`, and notes the sensor's health from what it produced. Fault
// propagation (docs/methods/faults.md 12.7) happens here, the same for every kind: a record built from a sensor
// with an invalidating fault in force at the message's time (its own, or one it read through the derive.ts
// lookups) is flagged 4 and names the faults (`invalid_reasons`), and the alert engine sees its values as 4.
// The series keep the values' own QC flags: the flux windows judge their inputs' faults themselves (flux.ts).
// The calibration file acts here too (field-marks.ts): the kind derives the corrected message, and the records
// it emits say `calibrated: true` when a correction entered them.
import type { DerivedRecord, Kind, SensorConfig, SensorMessage } from '../contract/index.js';
import type { DeriveContext } from './derive.js';
import type { FaultWiring } from './faults.js';
import { markMessage, markRecord, type MessageMarks } from './field-marks.js';
import { kindModules, type KindIO, type KindModule } from './kinds/index.js';
import type { Observer } from './observe.js';
import { capCount, insert, lowerBound, type Series } from './series.js';
import { sensorKey, sensorStateOf } from './sensors.js';
import type { ProcessorState, SensorState, SiteVar, StationVar } from './state.js';

/** Bound on remembered samples per series, whatever the sensor's rate. */
const MAX_SERIES_SAMPLES = 4096;

type PutRef = NonNullable<SensorState['lastPuts']>[number];

/** The KindIO of one message: every effect of a kind's derive goes through these methods. */
class MessageIO implements KindIO<Kind> {
  readonly ctx: DeriveContext;
  readonly sensorConfig: SensorConfig | undefined;
  readonly sensorState: SensorState;
  /** What this message wrote to the series (kept for a late spike verdict, see SensorState.lastPuts). */
  readonly puts: PutRef[] = [];
  readonly #m: SensorMessage;
  readonly #rxMs: number;
  readonly #out: DerivedRecord[];
  readonly #observer: Observer;
  readonly #state: ProcessorState;
  readonly #faults: FaultWiring | undefined;
  readonly #marks: MessageMarks;
  #reasons: string[] | undefined;
  #reasonsAt = -1;

  constructor(
    ctx: DeriveContext,
    observer: Observer,
    faults: FaultWiring | undefined,
    marks: MessageMarks,
    rxMs: number,
    out: DerivedRecord[],
  ) {
    const m = marks.message;
    this.ctx = ctx;
    this.#marks = marks;
    this.#state = ctx.state;
    this.#observer = observer;
    this.#faults = faults;
    this.#m = m;
    this.#rxMs = rxMs;
    this.#out = out;
    const sc = ctx.config.stations[m.station]?.sensors[m.sensor];
    this.sensorConfig = sc?.kind === m.kind ? sc : undefined;
    this.sensorState = sensorStateOf(ctx.state, m);
  }

  /** The sensors this message's records are built from so far: its own and the writers of what it read. */
  inputKeys(): Set<string> {
    const keys = new Set<string>([sensorKey(this.#m)]);
    if (this.#faults === undefined) return keys;
    for (const ref of this.ctx.inputs.used) for (const k of this.#faults.writers(ref)) keys.add(k);
    return keys;
  }

  /** The invalidating faults in force among the inputs at the message's time (docs/methods/faults.md 12.7). */
  faultReasons(): string[] {
    if (this.#faults === undefined) return [];
    // Asked at every QC, emit, observe and put: computed again only when the derivation read something new or
    // a QC result went to the fault state.
    const n = this.ctx.inputs.used.length;
    if (this.#reasons === undefined || this.#reasonsAt !== n) {
      this.#reasons = this.#faults.faultsAt(this.inputKeys(), this.#m.tMs);
      this.#reasonsAt = n;
    }
    return this.#reasons;
  }

  #faultFlag(flag: number): number {
    return flag < 4 && this.faultReasons().length > 0 ? 4 : flag;
  }

  /**
   * The value's own flag (QC and `flagIn`) goes back to the kind, for its records and series: a sensor's fault
   * is not a failed value, and lookups of later messages must still find its samples (a record built from them
   * is flagged 4 in `emit`). The alert engine sees the fault: no threshold acts on a faulty sensor's values.
   */
  qc(metric: string, variable: string, value: number, flagIn = 1): number {
    const m = this.#m;
    const v = this.#observer.qc(m, metric, variable, value, this.#rxMs, this.#out, this.#faultFlag(flagIn));
    this.#reasons = undefined; // the QC result may have opened or ended a fault
    if (v.previousFailedMs !== undefined) this.#markPreviousFailed(v.previousFailedMs);
    return Math.max(v.qcFlag, flagIn);
  }

  /** The supply voltage: QC and the battery rules, outside the fault propagation (it never invalidates data). */
  battery(volts: number): void {
    const m = this.#m;
    this.#observer.qc(m, `${m.kind}.battery_v`, 'battery_v', volts, this.#rxMs, this.#out, 1, false);
    this.#faults?.onBattery(m, volts);
  }

  alert(metric: string, value: number, flag: number): number {
    return this.#observer.alert(this.#m, metric, value, flag, this.#out);
  }

  emit(record: DerivedRecord): void {
    markRecord(this.ctx, this.#marks, record);
    const reasons = this.faultReasons();
    if (reasons.length > 0) {
      const r = record as { flag?: number; invalid_reasons?: string };
      r.flag = Math.max(r.flag ?? 1, 4);
      r.invalid_reasons = reasons.join(',');
    }
    this.#out.push(record);
  }

  observe(record: DerivedRecord, flag: number): void {
    this.#observer.record(record, this.#m.sensor, this.#m.tMs, this.#faultFlag(flag), this.#out);
  }

  put(v: StationVar, tMs: number, value: number, flag: number): void {
    const s = this.#state.stations[this.#m.station]?.[v];
    if (s === undefined || !Number.isFinite(value)) return;
    insert(s, tMs, value, flag);
    capCount(s, MAX_SERIES_SAMPLES);
    this.puts.push({ at: 's', v, t: tMs });
  }

  putSite(v: SiteVar, tMs: number, value: number | undefined, flag: number): void {
    if (value === undefined || !Number.isFinite(value)) return;
    const s = this.#state.site[v];
    insert(s, tMs, value, flag);
    capCount(s, MAX_SERIES_SAMPLES);
    this.puts.push({ at: 'x', v, t: tMs });
  }

  /**
   * The spike test judges a value only when the next one arrives: when it fails the previous value, the samples
   * that value's message stored are marked 4, so no window mean uses them (the records sent with it stand).
   */
  #markPreviousFailed(atMs: number): void {
    const st = this.sensorState;
    const puts = st.lastPuts;
    if (puts === undefined || st.lastPutsMs !== atMs) return;
    for (const p of puts) {
      const s: Series | undefined =
        p.at === 's'
          ? this.#state.stations[this.#m.station]?.[p.v as StationVar]
          : this.#state.site[p.v as SiteVar];
      if (s === undefined) continue;
      const i = lowerBound(s, p.t);
      if (s.t[i] === p.t) s.f[i] = 4;
    }
    st.lastPuts = [];
  }
}

/** The module of a message's kind. The table is exhaustive (kinds/index.ts), so there is always one. */
export function moduleOf(m: SensorMessage): KindModule<Kind> {
  return kindModules[m.kind] as KindModule<Kind>;
}

/** Derives one message (in event-time order) and notes its sensor's health (battery, worst record flag). */
export function deriveMessage(
  ctx: DeriveContext,
  observer: Observer,
  faults: FaultWiring | undefined,
  m: SensorMessage,
  rxMs: number,
  out: DerivedRecord[],
): void {
  const state = ctx.state;
  const from = out.length;
  if (state.firstDerivedMs === undefined || m.tMs < state.firstDerivedMs) state.firstDerivedMs = m.tMs;
  ctx.asOfMs = m.tMs;
  ctx.inputs.used = [];
  faults?.onMessage(m);
  const marks = markMessage(ctx, m);
  const io = new MessageIO(ctx, observer, faults, marks, rxMs, out);
  if (m.battery_v !== undefined) io.battery(m.battery_v);
  moduleOf(m).derive(marks.message, io);
  const st = io.sensorState;
  if (m.battery_v !== undefined) st.batteryV = m.battery_v;
  st.lastFlag = worstRecordFlag(out, from);
  // Only a message in the sensor's time order can be the "previous sample" of the next one's QC.
  if (st.lastPutsMs === undefined || m.tMs > st.lastPutsMs) {
    st.lastPuts = io.puts;
    st.lastPutsMs = m.tMs;
  }
}

/** The worst flag among the records (not alerts) of out[from..], 1 when none has one. */
function worstRecordFlag(out: readonly DerivedRecord[], from: number): number {
  let worst = 1;
  for (let i = from; i < out.length; i++) {
    const r = out[i] as DerivedRecord;
    const f = (r as { flag?: unknown }).flag;
    if (r.type !== 'alert' && typeof f === 'number' && f > worst) worst = f;
  }
  return worst;
}
