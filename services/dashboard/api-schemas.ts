// The dashboard's HTTP API as zod schemas: the server's query parsing, the types of its answers (the page's
// JSDoc types import them, see static/types.d.ts), and the OpenAPI document (openapi.ts) all come from here,
// so the three cannot drift apart.
import { z } from 'zod';
import { derivedRecordSchema, RECORD_TYPES } from '../../libs/contract/index.js';

const iso = z.string().describe('ISO 8601 time, UTC');
const isoOrNull = iso.nullable();
const id = z.string().regex(/^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/);

export const errorSchema = z.object({
  error: z.string().describe('stable REEFD_... code'),
  message: z.string().describe('what is wrong and how to fix it'),
});

// ------------------------------------------------------------------------------------------------- /api/site

const fieldSchema = z.object({
  unit: z.string().describe("UDUNITS-style unit; '1' dimensionless; '' for text"),
  label: z.string(),
  kind: z.enum(['number', 'string', 'boolean']),
});

export const ruleSchema = z.object({
  id: z.string(),
  metric: z.string().describe('<record type or message kind>.<field>'),
  class: z.enum(['threshold', 'fault']),
  fault: z.string().nullable(),
  dir: z.enum(['below', 'above']),
  limit: z.number(),
  clear: z.number(),
  unit: z.string(),
  label: z.string().describe('what the metric measures, in a few words'),
  raise_after_min: z.number(),
  severity: z.enum(['info', 'warning', 'critical']),
  stations: z.array(z.string()).nullable().describe('null: every station'),
  sensors: z.array(z.string()).nullable(),
});

export const siteSchema = z.object({
  site: z.string(),
  timezone: z.string().describe('IANA time zone of the site'),
  latitude_deg: z.number().nullable(),
  reef_axis_deg: z.number(),
  stations: z.array(
    z.object({
      id,
      label: z.string(),
      position: z.object({ lat: z.number(), lon: z.number() }).nullable(),
      sensors: z.array(
        z.object({
          id,
          kind: z.string(),
          label: z.string(),
          enabled: z.boolean(),
          interval_s: z.number().nullable().describe('configured reporting interval'),
        }),
      ),
    }),
  ),
  transects: z.array(
    z.object({
      id,
      label: z.string(),
      upstream: z.string(),
      downstream: z.string(),
      current: z.string(),
      length_m: z.number(),
    }),
  ),
  rules: z
    .array(ruleSchema)
    .describe('alert rules in force: thresholds, battery limits per kind, user rules'),
  faults: z.object({
    stale_factor: z.number(),
    stale_min_min: z.number(),
    silence_min: z.number(),
  }),
  processing: z.object({ window_min: z.number(), cadence_min: z.number() }),
  history: z.object({ window_h: z.number(), resolution_min: z.number() }),
  record_types: z
    .record(
      z.string(),
      z.object({
        subject: z.enum(['station', 'transect']),
        label: z.string(),
        fields: z.record(z.string(), fieldSchema),
      }),
    )
    .describe('every record type with the units and labels of its fields'),
});
export type SiteInfo = z.infer<typeof siteSchema>;

// ------------------------------------------------------------------------------------------- /api/records

const csvTypes = z
  .string()
  .regex(/^[a-z]+(,[a-z]+)*$/)
  .refine((s) => s.split(',').every((t) => (RECORD_TYPES as string[]).includes(t)), {
    message: `each type must be one of ${RECORD_TYPES.join(', ')}`,
  });

export const recordsQuerySchema = z.strictObject({
  type: csvTypes.optional().describe('record types, comma-separated'),
  station: id.optional(),
  transect: id.optional(),
  sensor: id.optional(),
  from: iso.optional().describe('inclusive; default 48 h before `to`'),
  to: iso.optional().describe('exclusive; default just after the newest record'),
  limit: z.coerce.number().int().min(1).max(50_000).default(5000),
  cursor: z.string().max(200).optional().describe('`next_cursor` of the previous page'),
  token: z.string().optional().describe('the access token, when not sent as a header'),
});
export type RecordsQuery = z.infer<typeof recordsQuerySchema>;

export const recordsPageSchema = z.object({
  source: z.string().describe('where the records came from: a durable store, or the dashboard history'),
  from: iso,
  to: iso,
  records: z.array(derivedRecordSchema),
  next_cursor: z.string().nullable().describe('null on the last page'),
});

export const historyQuerySchema = z.strictObject({
  type: csvTypes.optional(),
  station: id.optional(),
  transect: id.optional(),
  part: z
    .enum(['all', 'records', 'latest'])
    .default('all')
    .describe('records: the downsampled series only; latest: the newest record of each series only'),
  token: z.string().optional(),
});

export const historySchema = z.object({
  window_h: z.number(),
  resolution_min: z.number().describe('one record per series per this many minutes (worst flag kept)'),
  latest_t: isoOrNull,
  records: z.array(derivedRecordSchema),
  latest: z.array(derivedRecordSchema).describe('the newest record of every series, not downsampled'),
});
export type HistoryBody = z.infer<typeof historySchema>;

// -------------------------------------------------------------------------------------------- /api/alerts

export const alertViewSchema = z.object({
  id: z.string(),
  rule: z.string(),
  class: z.enum(['threshold', 'fault']),
  state: z.enum(['raised', 'cleared']),
  severity: z.string(),
  station: z.string().nullable(),
  sensor: z.string().nullable(),
  metric: z.string().nullable(),
  fault: z.string().nullable(),
  value: z.number().nullable(),
  limit: z.number().nullable(),
  unit: z.string().describe('unit of value and limit'),
  label: z.string().describe('what the metric measures'),
  raised_t: iso,
  cleared_t: isoOrNull,
  t: iso.describe('time of the latest transition'),
  ack: z
    .object({ by: z.string(), t: iso, comment: z.string().nullable() })
    .nullable()
    .describe('who acknowledged the alert, when, and what they said'),
  can_ack: z.boolean().describe('raised, not yet acknowledged, and an acknowledgement store is present'),
});
export type AlertView = z.infer<typeof alertViewSchema>;

export const alertsSchema = z.object({ alerts: z.array(alertViewSchema) });

export const ackRequestSchema = z.strictObject({
  by: z.string().trim().min(1).max(64).describe('the person who acknowledges'),
  comment: z.string().trim().max(500).optional().describe('what they saw or will do'),
});

export const ackResponseSchema = z.object({ ok: z.literal(true), alert: alertViewSchema });

// ----------------------------------------------------------------------------- calibrations and field log

export const calibrationSchema = z.object({
  sensor: z.string().describe('<station>/<sensor>'),
  field: z.string(),
  from: isoOrNull,
  to: isoOrNull,
  slope: z.number(),
  offset: z.number(),
  drift_per_day: z.number(),
  slope_drift_per_day: z.number(),
});
export type CalibrationEntry = z.infer<typeof calibrationSchema>;

export const logbookSchema = z.object({
  t: iso,
  station: z.string(),
  sensor: z.string().nullable().describe('null: the whole station'),
  event: z.string(),
  text: z.string(),
  exclude_from: isoOrNull,
  exclude_to: isoOrNull,
});
export type LogbookEntry = z.infer<typeof logbookSchema>;

export const fieldLogSchema = z.object({
  calibrations: z.array(calibrationSchema),
  logbook: z.array(logbookSchema),
  problems: z.array(z.string()).describe('entries of the files that could not be read, with why'),
});
export type FieldLog = z.infer<typeof fieldLogSchema>;

// ------------------------------------------------------------------------------------------- /api/sensors

export const sensorStates = ['ok', 'suspect', 'failing', 'silent', 'unknown', 'disabled'] as const;
export type SensorState = (typeof sensorStates)[number];

export const sensorViewSchema = z.object({
  station: z.string(),
  sensor: z.string(),
  kind: z.string(),
  label: z.string(),
  state: z.enum(sensorStates),
  state_reason: z
    .string()
    .describe('the cause of the state as a code: a fault name, a QC reason, battery_trend, qc_suspect, ok'),
  last_seen: isoOrNull,
  expected_interval_s: z.number().nullable(),
  expected_source: z.enum(['configured', 'usual', 'none']),
  last_gap_s: z.number().nullable().describe('time between the last two messages'),
  qc_flag: z.number().nullable(),
  qc_reason: z.string().nullable(),
  faults: z.array(
    z.object({
      id: z.string(),
      fault: z.string(),
      rule: z.string(),
      field: z.string().nullable().describe('the field the fault concerns (its metric), if any'),
      since: iso,
      value: z.number().nullable(),
      limit: z.number().nullable(),
      unit: z.string(),
    }),
  ),
  battery_v: z.number().nullable(),
  battery_limit_v: z.number().nullable(),
  battery_trend_v_per_day: z.number().nullable(),
  battery_hours_left: z.number().nullable().describe('hours until the limit at the recent trend'),
  battery_series: z.array(z.tuple([iso, z.number()])).describe('recent supply voltages, bounded'),
  last_values: z.array(
    z.object({
      field: z.string(),
      value: z.number().nullable(),
      unit: z.string(),
      label: z.string(),
      t: iso,
    }),
  ),
  calibrations: z.array(calibrationSchema),
  logbook: z.array(logbookSchema),
});
export type SensorView = z.infer<typeof sensorViewSchema>;

export const sensorsSchema = z.object({
  now: iso.describe('the time the states refer to'),
  sensors: z.array(sensorViewSchema),
  site_faults: z.array(alertViewSchema).describe('raised faults of the whole site (site_silent, outputs)'),
});
export type SensorsBody = z.infer<typeof sensorsSchema>;
