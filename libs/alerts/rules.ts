// Built-in and user rules resolved from the parsed `alerts:` section (config-schema.ts) into plain rule objects.

import { alertsConfigSchema, type AlertsConfig } from '../contract/index.js';
import type { SiteSilenceSettings } from './silence.js';
import type { ThresholdRule } from './types.js';

const MIN_MS = 60_000;

/**
 * Low supply voltage per kind, V (engineering defaults, not published values: a 12-V bus or battery pack is
 * taken as low near 10.5 V; pCO2 units and ADCPs with pumps or pings at high current, and the met mast with its
 * heater, get more margin). Set them to each instrument's stated minimum supply voltage.
 */
export const DEFAULT_BATTERY_V: Readonly<Record<string, number>> = Object.freeze({
  ctd: 10.5,
  oxygen: 10.5,
  pco2: 11.5,
  pressure: 10.5,
  adcp: 11.0,
  par: 10.5,
  met: 11.5,
  sample: 10.5,
});

export interface FaultSettings {
  readonly stale: {
    enabled: boolean;
    factor: number;
    minMs: number;
    severity: ThresholdRule['severity'];
    stations?: readonly string[];
    sensors?: readonly string[];
  };
  readonly flatline: {
    enabled: boolean;
    minFlag: 3 | 4;
    severity: ThresholdRule['severity'];
    stations?: readonly string[];
    sensors?: readonly string[];
  };
  readonly range: {
    enabled: boolean;
    clearAfterMs: number;
    severity: ThresholdRule['severity'];
    stations?: readonly string[];
    sensors?: readonly string[];
  };
  readonly spike: {
    enabled: boolean;
    minFlag: 3 | 4;
    count: number;
    windowMs: number;
    severity: ThresholdRule['severity'];
    stations?: readonly string[];
    sensors?: readonly string[];
  };
}

/** The battery trend warning (battery-warning.ts): per-kind cut-offs are the `battery` rule's. */
export interface BatteryTrendSettings {
  readonly enabled: boolean;
  readonly warnHours: number;
  readonly persistMs: number;
  readonly severity: ThresholdRule['severity'];
  readonly cutoffV: Readonly<Record<string, number>>;
  readonly stations?: readonly string[];
  readonly sensors?: readonly string[];
}

export interface ResolvedRules {
  readonly thresholds: readonly ThresholdRule[];
  readonly faults: FaultSettings;
  readonly batteryTrend: BatteryTrendSettings;
  /** The live daemon's wall-clock dead-man (silence.ts): alerts.silence_min, severity critical. */
  readonly silence: SiteSilenceSettings;
}

function scoped<T extends object>(
  o: T,
  c: { stations?: string[] | undefined; sensors?: string[] | undefined },
): T {
  const out: Record<string, unknown> = { ...(o as Record<string, unknown>) };
  if (c.stations) out.stations = Object.freeze([...c.stations]);
  if (c.sensors) out.sensors = Object.freeze([...c.sensors]);
  return Object.freeze(out) as T;
}

/** One built-in low-limit rule (low oxygen, low aragonite saturation, the forecast's low oxygen). */
function builtinRule(id: string, metricName: string, b: AlertsConfig['low_oxygen']): ThresholdRule {
  return scoped(
    {
      id,
      metric: metricName,
      class: 'threshold',
      dir: 'below',
      limit: b.below,
      clear: b.clear,
      raiseAfterMs: b.raise_after_min * MIN_MS,
      clearAfterMs: b.clear_after_min * MIN_MS,
      maxGapMs: b.max_gap_min * MIN_MS,
      severity: b.severity,
      ignoreSuspect: false,
    } satisfies ThresholdRule,
    b,
  );
}

/** The enabled built-in rules, in order. */
function builtinRules(cfg: AlertsConfig): ThresholdRule[] {
  const out: ThresholdRule[] = [];
  const builtin = (id: string, metricName: string, b: AlertsConfig['low_oxygen']): void => {
    if (!b.enabled) return;
    out.push(builtinRule(id, metricName, b));
  };
  builtin('low_oxygen', 'oxygen.o2_mg_l', cfg.low_oxygen);
  builtin('low_omega_ar', 'carbonate.omega_ar', cfg.low_omega_ar);
  // The forecast's warning shares the low-oxygen limits unless given its own (docs/methods/alerts.md 8.4).
  const lox = cfg.low_oxygen_expected;
  builtin('low_oxygen_expected', 'forecast.o2_min_mg_l', {
    ...lox,
    below: lox.below ?? cfg.low_oxygen.below,
    clear: lox.clear ?? Math.max(cfg.low_oxygen.clear, lox.below ?? cfg.low_oxygen.below),
  });
  return out;
}

/** The low supply voltage rules, one per instrument kind. */
function batteryRules(cfg: AlertsConfig): ThresholdRule[] {
  const bat = cfg.faults.battery;
  if (!bat.enabled) return [];
  const volts: Record<string, number> = { ...DEFAULT_BATTERY_V, ...bat.below_v };
  return Object.entries(volts).map(([kind, v]) =>
    scoped(
      {
        id: 'battery',
        metric: `${kind}.battery_v`,
        class: 'fault',
        fault: 'battery',
        dir: 'below',
        limit: v,
        clear: v + bat.clear_margin_v,
        raiseAfterMs: bat.raise_after_min * MIN_MS,
        clearAfterMs: 0,
        maxGapMs: Math.max(30 * MIN_MS, 3 * bat.raise_after_min * MIN_MS),
        severity: bat.severity,
        ignoreSuspect: false,
      } satisfies ThresholdRule,
      bat,
    ),
  );
}

/** The enabled user rules of `alerts.rules`, in the config's order. */
function userRules(cfg: AlertsConfig): ThresholdRule[] {
  const out: ThresholdRule[] = [];
  for (const [id, r] of Object.entries(cfg.rules)) {
    if (!r.enabled) continue;
    const dir = r.below !== undefined ? 'below' : 'above';
    const limit = (r.below ?? r.above) as number;
    out.push(
      scoped(
        {
          id,
          metric: r.metric,
          class: r.class,
          dir,
          limit,
          clear: r.clear ?? limit,
          raiseAfterMs: r.raise_after_min * MIN_MS,
          clearAfterMs: r.clear_after_min * MIN_MS,
          maxGapMs: r.max_gap_min * MIN_MS,
          severity: r.severity,
          ignoreSuspect: r.ignore_suspect,
        } satisfies ThresholdRule,
        r,
      ),
    );
  }
  return out;
}

/** The battery trend warning's settings; its per-kind cut-offs are the battery rule's. */
function batteryTrendSettings(cfg: AlertsConfig): BatteryTrendSettings {
  const bat = cfg.faults.battery;
  return scoped(
    {
      enabled: bat.enabled && bat.warn_hours > 0,
      warnHours: bat.warn_hours,
      persistMs: bat.raise_after_min * MIN_MS,
      severity: bat.severity,
      cutoffV: Object.freeze({ ...DEFAULT_BATTERY_V, ...bat.below_v }),
    },
    bat,
  );
}

/** The stale, flatline, range and spike fault detectors' settings. */
function faultSettings(f: AlertsConfig['faults']): FaultSettings {
  return Object.freeze({
    stale: scoped(
      {
        enabled: f.stale.enabled,
        factor: f.stale.factor,
        minMs: f.stale.min_min * MIN_MS,
        severity: f.stale.severity,
      },
      f.stale,
    ),
    flatline: scoped(
      { enabled: f.flatline.enabled, minFlag: f.flatline.min_flag, severity: f.flatline.severity },
      f.flatline,
    ),
    range: scoped(
      {
        enabled: f.range.enabled,
        clearAfterMs: f.range.clear_after_min * MIN_MS,
        severity: f.range.severity,
      },
      f.range,
    ),
    spike: scoped(
      {
        enabled: f.spike.enabled,
        minFlag: f.spike.min_flag,
        count: f.spike.count,
        windowMs: f.spike.window_min * MIN_MS,
        severity: f.spike.severity,
      },
      f.spike,
    ),
  });
}

/** Resolves a parsed config into the rule list the engine evaluates. */
export function resolveRules(cfg: AlertsConfig): ResolvedRules {
  const out: ThresholdRule[] = [...builtinRules(cfg), ...batteryRules(cfg), ...userRules(cfg)];
  return Object.freeze({
    thresholds: Object.freeze(out),
    // Critical: when the whole site is silent nothing else will tell anyone.
    silence: Object.freeze({ silenceMs: cfg.silence_min * MIN_MS, severity: 'critical' as const }),
    batteryTrend: batteryTrendSettings(cfg),
    faults: faultSettings(cfg.faults),
  });
}

/** The rules that apply with no `alerts:` section (docs/contract-v1.md section 4). */
export const DEFAULT_RULES: ResolvedRules = resolveRules(alertsConfigSchema.parse({}));

/** True when a rule's scope covers this station and sensor. */
export function inScope(
  s: { stations?: readonly string[]; sensors?: readonly string[] },
  station: string,
  sensor?: string,
): boolean {
  if (s.stations && !s.stations.includes(station)) return false;
  if (s.sensors && (sensor === undefined || !s.sensors.includes(sensor))) return false;
  return true;
}
