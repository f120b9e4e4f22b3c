// The lookups every derivation makes: the derive context (configuration, state, the message's time) and the
// station's CTD, the site's barometer and a station's TA at a time. The derivations themselves live with their
// kind (kinds/<kind>.ts); the processor owns the state and the ordering.
import type { ReefdConfig } from '../contract/index.js';
import type { CarbonateOptions } from '../carbonate/index.js';
import { gravity } from '../seawater/index.js';
import { NO_FIELD_HOOKS, type FieldHooks } from './field.js';
import { interpolate, localMean, nearest, type Pick, type Series } from './series.js';
import type { ProcessorState, SiteVar, StationVar } from './state.js';

const MIN = 60_000;
const HOUR = 3_600_000;
/** Standard atmosphere, hPa. */
export const STD_BARO_HPA = 1013.25;

/** A series a derivation read: a station's or the site's (faults.ts maps it to the sensors that write it). */
export type InputRef = { station: string; v: StationVar } | { station: null; v: SiteVar };

/**
 * The inputs of the message being derived: every lookup below notes the series it took a value from, so the
 * record knows the sensors it was built from (docs/methods/faults.md 12.7). `healthy` says whether the writers
 * of a series are free of invalidating faults at a time: a lookup with a fallback (the standard barometer, the
 * default density) takes the fallback instead of a faulty sensor.
 */
export interface InputTracker {
  used: InputRef[];
  healthy(ref: InputRef, tMs: number): boolean;
}

export interface DeriveContext {
  /**
   * Derivations read only samples up to this time (the message's own `t`): what else happens to have been
   * derived already depends on delivery order, so looking past `t` would make records order-dependent.
   */
  asOfMs: number;
  config: ReefdConfig;
  state: ProcessorState;
  carbonateOptions: CarbonateOptions;
  gMS2: number;
  inputs: InputTracker;
  /** The calibration file and the field logbook (field.ts). */
  field: FieldHooks;
}

const ALWAYS_HEALTHY = (): boolean => true;

export function makeContext(
  config: ReefdConfig,
  state: ProcessorState,
  field: FieldHooks = NO_FIELD_HOOKS,
  healthy: InputTracker['healthy'] = ALWAYS_HEALTHY,
): DeriveContext {
  return {
    asOfMs: Infinity,
    inputs: { used: [], healthy },
    config,
    state,
    field,
    carbonateOptions: {
      carbonicConstants: config.carbonate.carbonic_constants,
      boron: config.carbonate.boron,
    } satisfies CarbonateOptions,
    gMS2: gravity(config.latitude_deg),
  };
}

/** Notes that the message's records are built from the series `ref` (see InputTracker). */
export function use(ctx: DeriveContext, ref: InputRef): void {
  ctx.inputs.used.push(ref);
}

export function series(ctx: DeriveContext, station: string, v: StationVar): Series {
  const st = ctx.state.stations[station];
  if (st === undefined)
    throw new Error(`processor: station ${station} has no state (config and state disagree)`);
  return st[v];
}

/**
 * Temperature and salinity of the station's CTD at tMs (+-ctd_average_min mean, else nearest within the limit).
 * `optional`: the caller has a fallback without a CTD, so a CTD with a fault in force gives undefined.
 */
export function ctdAt(
  ctx: DeriveContext,
  station: string,
  tMs: number,
  optional = false,
): { temp: Pick; sal: Pick } | undefined {
  if (
    optional &&
    !(ctx.inputs.healthy({ station, v: 'temp' }, tMs) && ctx.inputs.healthy({ station, v: 'sal' }, tMs))
  )
    return undefined;
  const p = ctx.config.processing;
  const temp = localMean(
    series(ctx, station, 'temp'),
    tMs,
    p.ctd_average_min * MIN,
    p.ctd_match_min * MIN,
    ctx.asOfMs,
  );
  const sal = localMean(
    series(ctx, station, 'sal'),
    tMs,
    p.ctd_average_min * MIN,
    p.ctd_match_min * MIN,
    ctx.asOfMs,
  );
  if (!temp || !sal) return undefined;
  use(ctx, { station, v: 'temp' });
  use(ctx, { station, v: 'sal' });
  return { temp, sal };
}

/**
 * Barometric pressure at tMs, hPa, interpolated; after a gap over baro_max_gap_h, or while the barometer has a
 * fault in force, the standard value, flag 3.
 */
export function baroAt(
  ctx: DeriveContext,
  tMs: number,
): { hpa: number; flag: number; source: 'met' | 'default' } {
  const ref: InputRef = { station: null, v: 'baro' };
  const pick = ctx.inputs.healthy(ref, tMs)
    ? interpolate(ctx.state.site.baro, tMs, ctx.config.processing.baro_max_gap_h * HOUR, ctx.asOfMs)
    : undefined;
  if (pick) {
    use(ctx, ref);
    return { hpa: pick.value, flag: pick.flag, source: 'met' };
  }
  return { hpa: ctx.config.processing.default_baro_hpa, flag: 3, source: 'default' };
}

/** The worst of QARTOD flags (1 when none is given). */
export const worst = (...f: number[]): number => f.reduce((a, b) => (b > a ? b : a), 1);

export type TaSource = 'salinity' | 'sample' | 'measured';

/** TA for a station at tMs: the latest bottle sample within the age limit (if configured), else TA(S). */
export function taFor(
  ctx: DeriveContext,
  station: string,
  tMs: number,
  salinity: number,
): { ta: number; source: TaSource } {
  const a = ctx.config.alkalinity;
  if (a.source === 'samples') {
    const s = series(ctx, station, 'sampleTa');
    const maxAge = ctx.config.processing.sample_max_age_h * HOUR;
    const pick = nearest(s, tMs, maxAge);
    if (pick && pick.tMs <= tMs) {
      const sSal = nearest(series(ctx, station, 'sampleSal'), pick.tMs, 0);
      use(ctx, { station, v: 'sampleTa' });
      // Carry the bottle TA to the present salinity (TA is conservative with S; Friis et al. 2003).
      const ta = sSal ? (pick.value * salinity) / sSal.value : pick.value;
      return { ta, source: 'sample' };
    }
  }
  return { ta: (a.ta_s35_umol_kg * salinity) / 35, source: 'salinity' };
}
