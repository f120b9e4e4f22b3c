// Derives one message through its kind's module (kinds/): binds the message to a KindIO, checks the battery
// (every kind), runs the module's `derive`, and notes the sensor's health from what it produced.
import type { DerivedRecord, Kind, SensorConfig, SensorMessage } from '../contract/index.js';
import type { DeriveContext } from './derive.js';
import { kindModules, type KindIO, type KindModule } from './kinds/index.js';
import type { Observer } from './observe.js';
import { capCount, insert } from './series.js';
import { sensorStateOf } from './sensors.js';
import type { ProcessorState, SensorState, SiteVar, StationVar } from './state.js';

/** Bound on remembered samples per series, whatever the sensor's rate. */
const MAX_SERIES_SAMPLES = 4096;

/** The KindIO of one message: every effect of a kind's derive goes through these methods. */
class MessageIO implements KindIO<Kind> {
  readonly ctx: DeriveContext;
  readonly sensorConfig: SensorConfig | undefined;
  readonly sensorState: SensorState;
  readonly #m: SensorMessage;
  readonly #rxMs: number;
  readonly #out: DerivedRecord[];
  readonly #observer: Observer;
  readonly #state: ProcessorState;

  constructor(ctx: DeriveContext, observer: Observer, m: SensorMessage, rxMs: number, out: DerivedRecord[]) {
    this.ctx = ctx;
    this.#state = ctx.state;
    this.#observer = observer;
    this.#m = m;
    this.#rxMs = rxMs;
    this.#out = out;
    const sc = ctx.config.stations[m.station]?.sensors[m.sensor];
    this.sensorConfig = sc?.kind === m.kind ? sc : undefined;
    this.sensorState = sensorStateOf(ctx.state, m);
  }

  qc(metric: string, variable: string, value: number, flagIn = 1): number {
    return this.#observer.qc(this.#m, metric, variable, value, this.#rxMs, this.#out, flagIn);
  }

  alert(metric: string, value: number, flag: number): number {
    return this.#observer.alert(this.#m, metric, value, flag, this.#out);
  }

  emit(record: DerivedRecord): void {
    this.#out.push(record);
  }

  observe(record: DerivedRecord, flag: number): void {
    this.#observer.record(record, this.#m.sensor, this.#m.tMs, flag, this.#out);
  }

  put(v: StationVar, tMs: number, value: number, flag: number): void {
    const s = this.#state.stations[this.#m.station]?.[v];
    if (s === undefined || !Number.isFinite(value)) return;
    insert(s, tMs, value, flag);
    capCount(s, MAX_SERIES_SAMPLES);
  }

  putSite(v: SiteVar, tMs: number, value: number | undefined, flag: number): void {
    if (value === undefined || !Number.isFinite(value)) return;
    const s = this.#state.site[v];
    insert(s, tMs, value, flag);
    capCount(s, MAX_SERIES_SAMPLES);
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
  m: SensorMessage,
  rxMs: number,
  out: DerivedRecord[],
): void {
  const state = ctx.state;
  const from = out.length;
  if (state.firstDerivedMs === undefined || m.tMs < state.firstDerivedMs) state.firstDerivedMs = m.tMs;
  ctx.asOfMs = m.tMs;
  const io = new MessageIO(ctx, observer, m, rxMs, out);
  if (m.battery_v !== undefined) io.qc(`${m.kind}.battery_v`, 'battery_v', m.battery_v);
  moduleOf(m).derive(m, io);
  if (m.battery_v !== undefined) io.sensorState.batteryV = m.battery_v;
  io.sensorState.lastFlag = worstRecordFlag(out, from);
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
