// Site configuration of contract v1 (docs/contract-v1.md, section 3) plus the project's own sections
// (processing, sources, outputs, archive, http). Unknown keys are rejected everywhere; defaults live here only.
import { z } from 'zod';
import { alertsConfigSchema, notifyConfigSchema } from './alert-config-schema.js';
import { ID_PATTERN, type Kind } from './ids.js';

const id = z.string().regex(ID_PATTERN, 'must match [A-Za-z0-9][A-Za-z0-9_.-]{0,63}');
const bearing = z.number().min(0).lt(360);

/** A secret is never inline: it is read from an environment variable or a file (mode 0600 or stricter). */
export const secretRefSchema = z.union(
  [
    z.strictObject({ env: z.string().regex(/^[A-Za-z_][A-Za-z0-9_]*$/) }),
    z.strictObject({ file: z.string().min(1) }),
  ],
  { error: 'secrets are read from {env: NAME} or {file: PATH}, never written inline' },
);
export type SecretRef = z.infer<typeof secretRefSchema>;

const sensorCommon = {
  label: z.string().max(80).optional(),
  /** Nominal reporting interval; when absent, the stale rule learns it from the data. */
  interval_s: z.number().positive().max(86400).optional(),
  /** Set false to keep a sensor configured but ignored (recovered, being serviced). */
  enabled: z.boolean().default(true),
};

/**
 * Sensor height above the bed, m. A reef station's pressure sensor or upward-looking ADCP sits on a frame a
 * few tens of centimetres to a few metres up (common practice); past 10 m the number is a depth or a
 * mistake, and the wave and current derivations would use it as given.
 */
const heightAboveBed = z.number().min(0).max(10, {
  error: 'is the height above the bed, at most 10 m on a reef frame (not the water depth)',
});

export const pressureSensorSchema = z.strictObject({
  kind: z.literal('pressure'),
  ...sensorCommon,
  height_m: heightAboveBed,
});
export const adcpSensorSchema = z.strictObject({
  kind: z.literal('adcp'),
  ...sensorCommon,
  /** Above the bed; a downward-looking ADCP (on a buoy or pier) may be higher, up to 100 m. */
  height_m: z.number().min(0).max(100),
  beam_angle_deg: z.number().min(5).max(45).default(20),
  orientation: z.enum(['up', 'down']).default('up'),
  declination_deg: z.number().min(-180).max(180).default(0),
  heading_offset_deg: z.number().min(-180).max(180).default(0),
  head: z.enum(['convex', 'concave']).default('convex'),
  first_bin_range_m: z.number().positive().max(100).optional(),
});
export const ctdSensorSchema = z.strictObject({ kind: z.literal('ctd'), ...sensorCommon });
export const oxygenSensorSchema = z.strictObject({
  kind: z.literal('oxygen'),
  ...sensorCommon,
  /** Salinity the optode was set to, when its messages do not say (`sal_setting` in the message wins). */
  sal_setting: z.number().min(0).max(50).optional(),
});
export const pco2SensorSchema = z.strictObject({ kind: z.literal('pco2'), ...sensorCommon });
export const parSensorSchema = z.strictObject({ kind: z.literal('par'), ...sensorCommon });
export const metSensorSchema = z.strictObject({
  kind: z.literal('met'),
  ...sensorCommon,
  /** Anemometer height above the sea surface, for the U10 conversion. */
  wind_height_m: z.number().positive().max(100).default(10),
});
export const sampleSensorSchema = z.strictObject({ kind: z.literal('sample'), ...sensorCommon });

export const sensorConfigSchema = z.discriminatedUnion('kind', [
  pressureSensorSchema,
  adcpSensorSchema,
  ctdSensorSchema,
  oxygenSensorSchema,
  pco2SensorSchema,
  parSensorSchema,
  metSensorSchema,
  sampleSensorSchema,
]);
// One sensor schema per message kind (ids.ts KINDS), no more: a kind without one is a compile error naming it.
type SensorKindsOff =
  | Exclude<Kind, z.infer<typeof sensorConfigSchema>['kind']>
  | Exclude<z.infer<typeof sensorConfigSchema>['kind'], Kind>;
const _sensorSchemaPerKind: [SensorKindsOff] extends [never] ? true : SensorKindsOff = true;

export const stationSchema = z.strictObject({
  label: z.string().max(80).optional(),
  position: z
    .strictObject({ lat: z.number().min(-90).max(90), lon: z.number().min(-180).max(180) })
    .optional(),
  sensors: z.record(id, sensorConfigSchema),
});

export const transectSchema = z.strictObject({
  upstream: id,
  downstream: id,
  length_m: z.number().positive().max(100_000),
  current: id,
  pq: z.number().min(0.5).max(2).default(1.0),
  bearing_deg: bearing.optional(),
  label: z.string().max(80).optional(),
  /** When the flow runs backwards, swap upstream and downstream instead of flagging the window. */
  swap_on_reverse: z.boolean().default(false),
  min_speed_m_s: z.number().min(0).default(0.02),
  max_angle_deg: z.number().min(0).max(90).default(30),
  max_residence_min: z.number().positive().default(240),
  /**
   * Diffuse attenuation of PAR in the transect's water, m-1 (reefd extension): the flux windows' PAR is then
   * the light at the bed, PAR exp(-kd h) over the window's mean depth h, for the daily light responses.
   */
  kd_par_per_m: z.number().min(0).max(5).optional(),
  /**
   * Hours after the current station's last valid ensemble during which the fitted flow model carries the
   * budget (windows flagged 3, note `modelled_flow`); 0 turns it off (reefd extension).
   */
  modelled_flow_max_h: z.number().min(0).max(168).default(6),
});

const processingSchema = z
  .strictObject({
    window_min: z.number().positive().max(360).default(30),
    cadence_min: z.number().positive().max(360).default(10),
    lateness_min: z.number().min(0).max(1440).default(10),
    /**
     * Hold messages this long (at most lateness_min) and derive them in event-time order: records then do not
     * depend on the delivery order within it, at the cost of that much latency. 0: derive on arrival.
     */
    reorder_min: z.number().min(0).max(1440).default(0),
    /** Flux windows are computed this long after the watermark passes their end (>= the longest burst). */
    window_delay_min: z.number().min(0).max(360).default(20),
    ctd_match_min: z.number().positive().max(1440).default(30),
    ctd_average_min: z.number().min(0).max(60).default(5),
    baro_max_gap_h: z.number().positive().max(48).default(3),
    default_baro_hpa: z.number().min(800).max(1100).default(1013.25),
    xco2_air_ppm: z.number().min(100).max(2000).default(425),
    sample_max_age_h: z
      .number()
      .positive()
      .max(24 * 30)
      .default(72),
  })
  .prefault({});

/**
 * Names of the published constant sets a site may choose (the carbonate library's option values; a test in
 * libs/carbonate keeps the two lists equal). First entry = default.
 */
export const CARBONIC_CONSTANT_SETS = ['lueker2000', 'dickson-millero1987'] as const;
export const BORON_RATIOS = ['lee2010', 'uppstrom1974'] as const;

const carbonateOptionsSchema = z
  .strictObject({
    /** K1 and K2 of carbonic acid: Lueker et al. (2000) or Dickson & Millero (1987). */
    carbonic_constants: z.enum(CARBONIC_CONSTANT_SETS).default('lueker2000'),
    /** Total boron to salinity ratio: Lee et al. (2010) or Uppstrom (1974). */
    boron: z.enum(BORON_RATIOS).default('lee2010'),
    /** The key's old name: refused with a message naming the new one. */
    k1k2: z.never({ error: 'is renamed carbonate.carbonic_constants (same values)' }).optional(),
  })
  .prefault({});

/** True for a time zone name the runtime knows (IANA, e.g. Pacific/Tahiti), checked without any clock. */
export function isTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

const tlsSchema = z.strictObject({
  ca_file: z.string().optional(),
  cert_file: z.string().optional(),
  key_file: z.string().optional(),
  /** Certificate checks stay on unless a test bench turns them off explicitly. */
  verify: z.boolean().default(true),
});

const mqttSourceSchema = z.strictObject({
  url: z.string().regex(/^(mqtts?|wss?|tcp|ssl):\/\//, 'an mqtt://, mqtts://, ws:// or wss:// URL'),
  client_id: z.string().min(1).max(64).default('reefd'),
  username: z.string().optional(),
  password: secretRefSchema.optional(),
  tls: tlsSchema.optional(),
  clean_start: z.boolean().default(false),
  session_expiry_s: z
    .int()
    .min(0)
    .default(7 * 24 * 3600),
});

const saslSchema = z.strictObject({
  mechanism: z.enum(['plain', 'scram-sha-256', 'scram-sha-512']),
  username: z.string(),
  password: secretRefSchema,
});

const kafkaCommon = {
  brokers: z.array(z.string().min(1)).min(1),
  client_id: z.string().default('reefd'),
  tls: tlsSchema.optional(),
  sasl: saslSchema.optional(),
};

const kafkaSourceSchema = z.strictObject({
  ...kafkaCommon,
  topic: z.string().min(1),
  group_id: z.string().default('reefd'),
});

const influxOutputSchema = z.strictObject({
  url: z.string().url(),
  /** v2: the /api/v2/write API (InfluxDB 2.x/3.x, VictoriaMetrics); v1: /write?db= of InfluxDB 1.x. */
  api: z.enum(['v2', 'v1']).default('v2'),
  org: z.string().default('reefd'),
  bucket: z.string().default('reefd'),
  db: z.string().default('reefd'),
  token: secretRefSchema.optional(),
  username: z.string().optional(),
  password: secretRefSchema.optional(),
  tls: tlsSchema.optional(),
  batch_size: z.int().positive().max(100_000).default(5000),
  flush_ms: z.int().positive().max(600_000).default(1000),
  spool_max_mb: z.number().positive().default(512),
  /** String fields (sensor, ta_source, nec_method, ids) as fields; set false for VictoriaMetrics. */
  string_fields: z.boolean().default(true),
});

const kafkaOutputSchema = z.strictObject({
  ...kafkaCommon,
  topic: z.string().min(1).default('reefd.derived'),
  spool_max_mb: z.number().positive().default(512),
});

/**
 * Edge mode (deploy/SCALING.md): every accepted raw message is forwarded to Kafka with the contract's
 * record key `<site>/<station>/<sensor>`, through a spooled, ordered producer. The partition is chosen by
 * site (default: a site's transects need all of its stations in one processor) or by station.
 */
const bridgeSchema = z.strictObject({
  kafka: z.strictObject({
    ...kafkaCommon,
    topic: z.string().min(1),
    partition_by: z.enum(['site', 'station']).default('site'),
    spool_max_mb: z.number().positive().default(512),
  }),
  /** Also run the processor at the edge (local dashboard); by default an edge only archives and forwards. */
  derive: z.boolean().default(false),
});

const deadLetterSchema = z.strictObject({
  path: z.string().optional(),
  mqtt_topic: z.string().optional(),
  kafka_topic: z.string().optional(),
  max_per_min: z.int().positive().default(600),
});

export const configSchema = z
  .strictObject({
    site: id,
    topic_prefix: z
      .string()
      .regex(/^[A-Za-z0-9_.-]+(\/[A-Za-z0-9_.-]+)*$/)
      .default('reef'),
    reef_axis_deg: bearing,
    latitude_deg: z.number().min(-90).max(90).optional(),
    /** IANA time zone of the site: local days of the daily records, the dashboard's clock. */
    timezone: z
      .string()
      .refine(isTimeZone, { error: 'is not an IANA time zone name (for example Pacific/Tahiti or UTC)' })
      .default('UTC'),
    /** YAML list of sensor corrections, relative to the configuration file (docs/contract-v1.md). */
    calibration_file: z.string().min(1).optional(),
    /** YAML list of field events (cleaning, swaps, exclusions), relative to the configuration file. */
    logbook_file: z.string().min(1).optional(),
    stations: z.record(id, stationSchema),
    alkalinity: z
      .strictObject({
        source: z.enum(['salinity', 'samples']).default('salinity'),
        ta_s35_umol_kg: z.number().min(500).max(5000).default(2300),
      })
      .prefault({}),
    transects: z.record(id, transectSchema).default({}),
    carbonate: carbonateOptionsSchema,
    processing: processingSchema,
    sources: z
      .strictObject({ mqtt: mqttSourceSchema.optional(), kafka: kafkaSourceSchema.optional() })
      .optional(),
    bridge: bridgeSchema.optional(),
    outputs: z
      .strictObject({
        ndjson: z.strictObject({ path: z.string() }).optional(),
        influx: influxOutputSchema.optional(),
        kafka: kafkaOutputSchema.optional(),
        dead_letter: deadLetterSchema.prefault({}),
      })
      .prefault({}),
    archive: z
      .strictObject({
        dir: z.string().optional(),
        retention_days: z.int().min(0).default(0),
        fsync_ms: z.int().min(0).max(10_000).default(200),
      })
      .prefault({}),
    /**
     * Checkpoint, archive, spools, output ledgers, alert outbox. No default here: it depends on where reefd
     * runs (services/config/load.ts resolveDataDir: systemd's StateDirectory, else `reefd-data` beside the
     * configuration file).
     */
    data_dir: z.string().min(1).optional(),
    // Sections with defaults are always present after parsing, so every default has this one home.
    alerts: alertsConfigSchema.prefault({}),
    notify: notifyConfigSchema.prefault({}),
    http: z
      .strictObject({
        host: z.string().default('127.0.0.1'),
        port: z.int().min(0).max(65535).default(8080),
        token: secretRefSchema.optional(),
      })
      .prefault({}),
  })
  .superRefine((cfg, ctx) => {
    const stationIds = new Set(Object.keys(cfg.stations));
    const kindsAt = (station: string) =>
      new Set(Object.values(cfg.stations[station]?.sensors ?? {}).map((s) => s.kind));
    for (const [tid, tr] of Object.entries(cfg.transects)) {
      for (const role of ['upstream', 'downstream', 'current'] as const) {
        if (!stationIds.has(tr[role])) {
          ctx.addIssue({
            code: 'custom',
            path: ['transects', tid, role],
            message: `names station "${tr[role]}", which is not under stations`,
          });
        }
      }
      if (tr.upstream === tr.downstream) {
        ctx.addIssue({
          code: 'custom',
          path: ['transects', tid, 'downstream'],
          message: 'must differ from upstream',
        });
      }
      if (stationIds.has(tr.current) && !kindsAt(tr.current).has('adcp')) {
        ctx.addIssue({
          code: 'custom',
          path: ['transects', tid, 'current'],
          message: `station "${tr.current}" has no adcp sensor to give the depth-averaged velocity`,
        });
      }
      for (const role of ['upstream', 'downstream'] as const) {
        const st = tr[role];
        if (!stationIds.has(st)) continue;
        const kinds = kindsAt(st);
        if (!kinds.has('pressure')) {
          ctx.addIssue({
            code: 'custom',
            path: ['transects', tid, role],
            message: `station "${st}" has no pressure sensor; the budget takes its depth from one`,
          });
        }
        if (!kinds.has('oxygen')) {
          ctx.addIssue({
            code: 'custom',
            path: ['transects', tid, role],
            message: `station "${st}" has no oxygen sensor; NCP comes from the O2 budget`,
          });
        }
        if (!kinds.has('ctd')) {
          ctx.addIssue({
            code: 'custom',
            path: ['transects', tid, role],
            message: `station "${st}" has no ctd sensor; the budget needs its temperature and salinity`,
          });
        }
      }
    }
    if (cfg.alkalinity.source === 'samples') {
      const any = Object.keys(cfg.stations).some((s) => kindsAt(s).has('sample'));
      if (!any) {
        ctx.addIssue({
          code: 'custom',
          path: ['alkalinity', 'source'],
          message: 'is "samples" but no station has a sample sensor',
        });
      }
    }
    for (const [sid, st] of Object.entries(cfg.stations)) {
      for (const [name, sensor] of Object.entries(st.sensors)) {
        if (sensor.kind === 'adcp' && sensor.orientation === 'up' && sensor.height_m > 10) {
          ctx.addIssue({
            code: 'custom',
            path: ['stations', sid, 'sensors', name, 'height_m'],
            message:
              'is the height above the bed of an upward-looking ADCP, at most 10 m on a reef frame (not the water depth)',
          });
        }
      }
      const ctds = Object.values(st.sensors).filter((s) => s.kind === 'ctd').length;
      if (ctds > 1) {
        ctx.addIssue({
          code: 'custom',
          path: ['stations', sid, 'sensors'],
          message: 'has more than one ctd; name one per station (the station state takes t and S from it)',
        });
      }
    }
  });

/** The validated configuration, with every default filled in. Frozen by the loader. */
export type ReefdConfig = z.infer<typeof configSchema>;
export type ReefdConfigInput = z.input<typeof configSchema>;
export type SensorConfig = z.infer<typeof sensorConfigSchema>;
export type StationConfig = z.infer<typeof stationSchema>;
export type TransectConfig = z.infer<typeof transectSchema>;
