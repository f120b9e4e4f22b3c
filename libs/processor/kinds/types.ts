// What a sensor kind is to the processor: one module per kind (kinds/<kind>.ts), combined in one table
// (kinds/index.ts) typed so that a kind of the contract without a module, or a module without one of its
// pieces, does not compile. The processor itself never names a kind.
import type { DerivedRecord, Kind, SensorConfig, SensorMessage } from '../../contract/index.js';
import type { DeriveContext } from '../derive.js';
import type { SensorState, SiteVar, StationVar } from '../state.js';

/** The message of one kind. */
export type MessageOf<K extends Kind> = Extract<SensorMessage, { kind: K }>;
/** The configuration of a sensor of one kind. */
export type SensorConfigOf<K extends Kind> = Extract<SensorConfig, { kind: K }>;

/** Series of the processor state a kind writes or reads (state.ts lists them; the checkpoint holds them). */
export interface StateRefs<SV extends StationVar = StationVar, XV extends SiteVar = SiteVar> {
  /** `state.stations[station][var]`: per-station series. */
  readonly station: readonly SV[];
  /** `state.site[var]`: site-wide series (the met mast, the PAR sensor). */
  readonly site: readonly XV[];
}

/**
 * What a kind's `derive` may do, bound to one message (its station, sensor, event time and receive time).
 * Every effect of a message goes through here, so the processor can count, order and mark what a kind emits.
 * Q, SV and XV are the kind's own QC variables and written series: a module cannot QC a variable or write
 * a series it does not declare.
 */
export interface KindIO<
  K extends Kind,
  Q extends string = string,
  SV extends StationVar = StationVar,
  XV extends SiteVar = SiteVar,
> {
  /** Configuration, state and the lookups of derive.ts; `ctx.asOfMs` is the message's time. */
  readonly ctx: DeriveContext;
  /** The sensor's configuration, or undefined when the configuration has no sensor of this kind there. */
  readonly sensorConfig: SensorConfigOf<K> | undefined;
  /** The sensor's bookkeeping in the checkpoint (`state.sensors['station/sensor']`), e.g. warm starts. */
  readonly sensorState: SensorState;
  /**
   * QC of one value (libs/qc state `station/sensor/variable`), then the alert engine under `metric`
   * (`<kind or record type>.<field>`). `flagIn` is a flag the value already has (the result is the worse of
   * the two). Returns the flag.
   */
  qc(metric: string, variable: Q, value: number, flagIn?: number): number;
  /** The alert engine only, for a value with no QC variable (a fault marker, a derived speed). Returns `flag`. */
  alert(metric: string, value: number, flag: number): number;
  /** Emits a record (it goes out in the message's result, in call order). */
  emit(record: DerivedRecord): void;
  /**
   * Feeds every numeric field of an emitted record (but `flag`) to the alert engine as `<type>.<field>`,
   * at the message's time, with `flag`. Call it after `emit`, so the alerts follow their record.
   */
  observe(record: DerivedRecord, flag: number): void;
  /** Appends to a station series of this message's station (non-finite values are skipped). */
  put(v: SV, tMs: number, value: number, flag: number): void;
  /** Appends to a site series (undefined and non-finite values are skipped). */
  putSite(v: XV, tMs: number, value: number | undefined, flag: number): void;
}

/**
 * One sensor kind. Each piece is required, so a new kind is complete when it compiles.
 * `battery_v` is checked for every kind before `derive` (metric `<kind>.battery_v`), and the processor notes
 * the worst flag of the records a message produced as its sensor's health.
 */
export interface KindModule<
  K extends Kind,
  Q extends string = string,
  SV extends StationVar = StationVar,
  XV extends SiteVar = SiteVar,
> {
  readonly kind: K;
  /**
   * Release order among held messages of the same event time: lower first. Kinds others are paired with
   * (CTD, barometer, depth) go first, so a reading finds its partner of the same time. Unique per kind.
   */
  readonly order: number;
  /** The QC variables `derive` passes to `io.qc` (keys of libs/qc DEFAULT_QC_LIMITS), besides battery_v. */
  readonly qcVariables: readonly Q[];
  /** The series `derive` writes (through `io.put` and `io.putSite`: nothing else can be written). */
  readonly writes: StateRefs<SV, XV>;
  /** The series `derive` reads (through the derive.ts lookups), for the reader: not enforced. */
  readonly reads: StateRefs;
  /**
   * When a message is complete, ms: its sample time, or for a pressure burst stamped at its start the time
   * of its last sample. Lateness and the watermark use it, so a long burst is not late for being long.
   */
  completeMs(m: MessageOf<K>): number;
  /** QC, records, alerts and state of one message (in event-time order). */
  derive(m: MessageOf<K>, io: KindIO<K, Q, SV, XV>): void;
}

/** The table of every kind: a missing kind, or a module under the wrong kind, fails to compile. */
export type KindTable = { readonly [K in Kind]: KindModule<K> };

/**
 * Declares a kind module with its own QC variables and written series inferred from its lists, so that
 * `derive` can only QC and write what the module declares.
 */
export function defineKind<K extends Kind, Q extends string, SV extends StationVar, XV extends SiteVar>(
  m: KindModule<K, Q, SV, XV>,
): KindModule<K, Q, SV, XV> {
  return m;
}

/** `completeMs` of a kind whose messages are complete at their sample time. */
export const atSampleTime = (m: { tMs: number }): number => m.tMs;
