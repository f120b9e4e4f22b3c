// zod 4 schemas of the `alerts:` and `notify:` sections of the reefd YAML configuration (documented key by key in
// libs/alerts/README.md). They live in the contract, with the rest of the configuration, so that the contract
// depends on no feature; libs/alerts reads its settings through them. Strict objects: an unknown key is an error with its path. Defaults live here and only
// here; the built-in rules' defaults are the contract's (docs/contract-v1.md section 4) and docs/methods/alerts.md.

import { z } from 'zod';
import { BATTERY_RANGE, implausibleLimit, unknownMetric } from './alert-metrics.js';
import { ID_PATTERN, KINDS } from './ids.js';

const id = z.string().regex(ID_PATTERN, 'ids match [A-Za-z0-9][A-Za-z0-9_.-]{0,63}');
// A metric is one of the table's (alert-metrics.ts): a name the processor never feeds would never fire.
const metric = z.string().superRefine((name, ctx) => {
  const why = unknownMetric(name);
  if (why !== undefined) ctx.addIssue({ code: 'custom', message: why });
});

/** Each limit of a rule must be a plausible value of its metric (a wrong unit is caught here). */
function checkLimits(
  metricName: string,
  limits: Record<string, number | undefined>,
  ctx: z.core.$RefinementCtx,
): void {
  for (const [key, value] of Object.entries(limits)) {
    if (value === undefined) continue;
    const why = implausibleLimit(metricName, value);
    if (why !== undefined) ctx.addIssue({ code: 'custom', message: why, path: [key] });
  }
}
const minutes = z.number().finite().min(0);

export const severitySchema = z.enum(['info', 'warning', 'critical']);
export type Severity = z.output<typeof severitySchema>;

/** Where a rule applies: omitted = every station (site-wide scope). */
const scope = {
  stations: z.array(id).min(1).optional(),
  sensors: z.array(id).min(1).optional(),
};

function builtinThreshold(d: {
  metric: string;
  below: number;
  clear: number;
  raiseAfterMin: number;
  severity: Severity;
}) {
  return z
    .strictObject({
      enabled: z.boolean().default(true),
      below: z.number().finite().default(d.below),
      clear: z.number().finite().default(d.clear),
      raise_after_min: minutes.default(d.raiseAfterMin),
      clear_after_min: minutes.default(0),
      max_gap_min: z.number().finite().positive().default(30),
      severity: severitySchema.default(d.severity),
      ...scope,
    })
    .refine((r) => r.clear >= r.below, { message: 'clear must be >= below (hysteresis)', path: ['clear'] })
    .superRefine((r, ctx) => checkLimits(d.metric, { below: r.below, clear: r.clear }, ctx))
    .prefault({});
}

const userRule = z
  .strictObject({
    metric,
    below: z.number().finite().optional(),
    above: z.number().finite().optional(),
    clear: z.number().finite().optional(),
    raise_after_min: minutes.default(0),
    clear_after_min: minutes.default(0),
    max_gap_min: z.number().finite().positive().default(30),
    severity: severitySchema.default('warning'),
    class: z.enum(['threshold', 'fault']).default('threshold'),
    ignore_suspect: z.boolean().default(false),
    enabled: z.boolean().default(true),
    ...scope,
  })
  .superRefine((r, ctx) => {
    if (unknownMetric(r.metric) === undefined)
      checkLimits(r.metric, { below: r.below, above: r.above, clear: r.clear }, ctx);
    if ((r.below === undefined) === (r.above === undefined)) {
      ctx.addIssue({ code: 'custom', message: 'give exactly one of below or above', path: ['below'] });
      return;
    }
    if (r.clear === undefined) return;
    if (r.below !== undefined && r.clear < r.below) {
      ctx.addIssue({
        code: 'custom',
        message: 'with below, clear must be >= below (hysteresis)',
        path: ['clear'],
      });
    }
    if (r.above !== undefined && r.clear > r.above) {
      ctx.addIssue({
        code: 'custom',
        message: 'with above, clear must be <= above (hysteresis)',
        path: ['clear'],
      });
    }
  });

const faultCommon = { enabled: z.boolean().default(true), ...scope };

export const BUILTIN_RULE_IDS = [
  'low_oxygen',
  'low_oxygen_expected',
  'low_omega_ar',
  'stale',
  'flatline',
  'range',
  'spike',
  'battery',
  'battery_trend',
  'site_silent',
];

export const alertsConfigSchema = z
  .strictObject({
    // Contract: oxygen.o2_mg_l below 2.0 for 10 min, cleared above 2.5 (docs/methods/alerts.md: Diaz & Rosenberg 2008).
    low_oxygen: builtinThreshold({
      metric: 'oxygen.o2_mg_l',
      below: 2.0,
      clear: 2.5,
      raiseAfterMin: 10,
      severity: 'critical',
    }),
    // Contract: forecast.o2_min_mg_l below the low-oxygen limit. `below` and `clear` default to low_oxygen's;
    // a forecast is one value an hour at night, so it raises at once and tolerates the hour between issues.
    low_oxygen_expected: z
      .strictObject({
        enabled: z.boolean().default(true),
        below: z.number().finite().optional(),
        clear: z.number().finite().optional(),
        raise_after_min: minutes.default(0),
        clear_after_min: minutes.default(0),
        max_gap_min: z.number().finite().positive().default(90),
        severity: severitySchema.default('warning'),
        ...scope,
      })
      .refine((r) => r.below === undefined || r.clear === undefined || r.clear >= r.below, {
        message: 'clear must be >= below (hysteresis)',
        path: ['clear'],
      })
      .superRefine((r, ctx) => checkLimits('forecast.o2_min_mg_l', { below: r.below, clear: r.clear }, ctx))
      .prefault({}),
    // Contract: carbonate.omega_ar below 3.0 for 30 min; clear at 3.2 (our default; Guinotte et al. 2003).
    low_omega_ar: builtinThreshold({
      metric: 'carbonate.omega_ar',
      below: 3.0,
      clear: 3.2,
      raiseAfterMin: 30,
      severity: 'warning',
    }),
    faults: z
      .strictObject({
        stale: z
          .strictObject({
            ...faultCommon,
            factor: z.number().finite().min(1).default(3),
            min_min: minutes.default(5),
            severity: severitySchema.default('warning'),
          })
          .prefault({}),
        flatline: z
          .strictObject({
            ...faultCommon,
            min_flag: z.union([z.literal(3), z.literal(4)]).default(4),
            severity: severitySchema.default('warning'),
          })
          .prefault({}),
        range: z
          .strictObject({
            ...faultCommon,
            clear_after_min: minutes.default(10),
            severity: severitySchema.default('warning'),
          })
          .prefault({}),
        spike: z
          .strictObject({
            ...faultCommon,
            // 4 by default: the spike formula also marks the neighbours of a spike 3, which must not count.
            min_flag: z.union([z.literal(3), z.literal(4)]).default(4),
            count: z.number().int().min(1).default(3),
            window_min: z.number().finite().positive().default(60),
            severity: severitySchema.default('info'),
          })
          .prefault({}),
        battery: z
          .strictObject({
            ...faultCommon,
            below_v: z
              .partialRecord(
                z.enum(KINDS) /* every kind carries `battery_v` */,
                z
                  .number()
                  .finite()
                  .positive()
                  .max(BATTERY_RANGE.max, {
                    error: `a supply voltage limit above ${BATTERY_RANGE.max} V is not one a sensor logger has`,
                  }),
              )
              .default({}),
            clear_margin_v: z.number().finite().min(0).default(0.3),
            raise_after_min: minutes.default(10),
            // Trend warning (rule battery_trend): hours to the cut-off under this; 0 turns it off.
            warn_hours: z.number().finite().min(0).default(6),
            severity: severitySchema.default('warning'),
          })
          .prefault({}),
      })
      .prefault({}),
    rules: z.record(id, userRule).default({}),
    /**
     * Wall-clock minutes without any accepted message from the site before the live daemon raises
     * `site_silent` (never in replay: it is the only rule on the wall clock).
     */
    silence_min: z.number().finite().positive().max(10_080).default(15),
  })
  .superRefine((c, ctx) => {
    for (const k of Object.keys(c.rules)) {
      if (BUILTIN_RULE_IDS.includes(k)) {
        ctx.addIssue({
          code: 'custom',
          message: `"${k}" is a built-in rule id: tune it under alerts.${k.startsWith('low_') ? k : `faults.${k}`} instead`,
          path: ['rules', k],
        });
      }
    }
  });

export type AlertsConfigInput = z.input<typeof alertsConfigSchema>;
export type AlertsConfig = z.output<typeof alertsConfigSchema>;

/**
 * A secret never sits in the config file: it is read from an environment variable or a file at start-up.
 * (The `notify:` form; config-schema.ts has the one of the other sections, with its own message.)
 */
const notifySecretRefSchema = z.union([
  z.strictObject({ env: z.string().regex(/^[A-Za-z_][A-Za-z0-9_]*$/, 'an environment variable name') }),
  z.strictObject({ file: z.string().min(1) }),
]);

const rateLimit = z.strictObject({
  max_messages: z.number().int().min(1),
  per_min: z.number().finite().positive(),
});

const channelCommon = {
  enabled: z.boolean().default(true),
  min_severity: severitySchema.default('info'),
  rate_limit: rateLimit.optional(),
};

const mqttChannel = z.strictObject({
  type: z.literal('mqtt'),
  topic: z
    .string()
    .min(1)
    .refine((t) => !/[#+]/.test(t), 'a publish topic has no wildcards'),
  qos: z.union([z.literal(0), z.literal(1), z.literal(2)]).default(1),
  retain: z.boolean().default(false),
  ...channelCommon,
});
const webhookChannel = z.strictObject({
  type: z.literal('webhook'),
  url: z.url({ protocol: /^https?$/ }),
  secret: notifySecretRefSchema.optional(),
  timeout_s: z.number().finite().positive().default(10),
  ...channelCommon,
});
const smtpChannel = z.strictObject({
  type: z.literal('smtp'),
  host: z.string().min(1),
  port: z.number().int().min(1).max(65535).default(587),
  secure: z.boolean().default(false),
  from: z.email(),
  to: z.array(z.email()).min(1),
  auth: z.strictObject({ user: z.string().min(1), pass: notifySecretRefSchema }).optional(),
  timeout_s: z.number().finite().positive().default(30),
  ...channelCommon,
});
const dashboardChannel = z.strictObject({ type: z.literal('dashboard'), ...channelCommon });

export const notifyChannelSchema = z.discriminatedUnion('type', [
  mqttChannel,
  webhookChannel,
  smtpChannel,
  dashboardChannel,
]);
export type NotifyChannelConfig = z.output<typeof notifyChannelSchema>;

export const notifyConfigSchema = z.strictObject({
  channels: z
    .record(id, notifyChannelSchema)
    .default({ dashboard: { type: 'dashboard', enabled: true, min_severity: 'info' } }),
  group_window_s: z.number().finite().min(0).default(30),
  renotify_min: minutes.default(240),
  digest_threshold: z.number().int().min(2).default(20),
  rate_limit: rateLimit.prefault({ max_messages: 6, per_min: 60 }),
  retry: z
    .strictObject({
      base_s: z.number().finite().positive().default(5),
      max_s: z.number().finite().positive().default(900),
    })
    .prefault({}),
});

export type NotifyConfigInput = z.input<typeof notifyConfigSchema>;
export type NotifyConfig = z.output<typeof notifyConfigSchema>;
