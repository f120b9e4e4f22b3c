// `/openapi.json`: the OpenAPI 3.1 document of every `/api` endpoint, generated from the zod schemas the
// server itself parses and answers with (api-schemas.ts), so the document cannot describe another API than
// the one served. A test fetches every endpoint of a live server and checks each answer against it.
import { z } from 'zod';
import { derivedRecordSchema } from '../../libs/contract/index.js';
import {
  ackRequestSchema,
  ackResponseSchema,
  alertViewSchema,
  alertsSchema,
  calibrationSchema,
  errorSchema,
  fieldLogSchema,
  historyQuerySchema,
  historySchema,
  logbookSchema,
  recordsPageSchema,
  recordsQuerySchema,
  ruleSchema,
  sensorViewSchema,
  sensorsSchema,
  siteSchema,
} from './api-schemas.js';

type Json = Record<string, unknown>;

/** The named schemas, referenced as #/components/schemas/<name>. */
const COMPONENTS: readonly [string, z.ZodType][] = [
  ['Error', errorSchema],
  ['Record', derivedRecordSchema],
  ['Rule', ruleSchema],
  ['Site', siteSchema],
  ['RecordsPage', recordsPageSchema],
  ['History', historySchema],
  ['Alert', alertViewSchema],
  ['Alerts', alertsSchema],
  ['AckRequest', ackRequestSchema],
  ['AckResponse', ackResponseSchema],
  ['Calibration', calibrationSchema],
  ['LogbookEntry', logbookSchema],
  ['FieldLog', fieldLogSchema],
  ['Sensor', sensorViewSchema],
  ['Sensors', sensorsSchema],
];

const ref = (name: string) => ({ $ref: `#/components/schemas/${name}` });
const json = (name: string, description: string) => ({
  description,
  content: { 'application/json': { schema: ref(name) } },
});
const err = (description: string) => json('Error', description);

function componentSchemas(): Json {
  const registry = z.registry<{ id: string }>();
  for (const [id, schema] of COMPONENTS) registry.add(schema, { id });
  const out = z.toJSONSchema(registry, {
    target: 'draft-2020-12',
    io: 'output',
    unrepresentable: 'any',
    uri: (id) => `#/components/schemas/${id}`,
  }) as { schemas: Record<string, Json> };
  // Each component is a document of its own in zod's output; inside an OpenAPI document they are not.
  for (const s of Object.values(out.schemas)) {
    delete s.$schema;
    delete s.$id;
  }
  return out.schemas;
}

/** Query parameters of a strict object schema, each with the JSON Schema of its input. */
function queryParams(schema: z.ZodObject): Json[] {
  return Object.entries(schema.shape).map(([name, field]) => {
    const f = field as z.ZodType;
    const s = z.toJSONSchema(f, { target: 'draft-2020-12', io: 'input', unrepresentable: 'any' }) as Json;
    delete s.$schema;
    const description = typeof s.description === 'string' ? s.description : undefined;
    return {
      name,
      in: 'query',
      required: !f.safeParse(undefined).success,
      schema: s,
      ...(description !== undefined ? { description } : {}),
    };
  });
}

let cached: Json | undefined;

export function openApiDocument(version: string): Json {
  cached ??= {
    openapi: '3.1.0',
    info: {
      title: 'reefd dashboard API',
      version,
      description:
        'Site description, recent and durable records, alerts with acknowledgements, and the per-sensor view of ' +
        'a reefd daemon. Times are ISO 8601 UTC; units of every field are in /api/site (record_types). With an ' +
        'access token configured (http.token), send it as a Bearer token or the token query parameter.',
    },
    jsonSchemaDialect: 'https://json-schema.org/draft/2020-12/schema',
    components: {
      schemas: componentSchemas(),
      securitySchemes: {
        bearer: { type: 'http', scheme: 'bearer' },
        queryToken: { type: 'apiKey', in: 'query', name: 'token' },
      },
    },
    security: [{}, { bearer: [] }, { queryToken: [] }],
    paths: {
      '/api/site': {
        get: {
          summary: 'The site: names, positions, sensors, alert rules with limits and units, field units',
          operationId: 'getSite',
          responses: { '200': json('Site', 'the site') },
        },
      },
      '/api/history': {
        get: {
          summary: 'Recent records for the first screen: one per series per bucket, over the history window',
          operationId: 'getHistory',
          parameters: queryParams(historyQuerySchema),
          responses: { '200': json('History', 'the downsampled history'), '400': err('a bad parameter') },
        },
      },
      '/api/records': {
        get: {
          summary: 'Records of any range the daemon kept, from durable storage, paged',
          operationId: 'getRecords',
          parameters: queryParams(recordsQuerySchema),
          responses: {
            '200': json('RecordsPage', 'one page of records; follow next_cursor for more'),
            '400': err('a bad parameter (unknown type, from after to, bad time)'),
          },
        },
      },
      '/api/alerts': {
        get: {
          summary: 'Alerts: raised first, then those cleared within the history window',
          operationId: 'getAlerts',
          responses: { '200': json('Alerts', 'the alerts') },
        },
      },
      '/api/alerts/{id}/ack': {
        post: {
          summary: 'Acknowledge a raised alert, by a named person, with an optional comment',
          operationId: 'ackAlert',
          parameters: [{ name: 'id', in: 'path', required: true, schema: { type: 'string' } }],
          requestBody: { required: true, content: { 'application/json': { schema: ref('AckRequest') } } },
          responses: {
            '200': json(
              'AckResponse',
              'acknowledged (or already acknowledged: the first acknowledgement stands)',
            ),
            '400': err('no name, or a body that is not the JSON asked for'),
            '403': err('posted from another origin'),
            '404': err('no such alert'),
            '409': err('the alert has cleared: only a raised alert can be acknowledged'),
            '415': err('the body is not application/json'),
            '503': err('no acknowledgement store (a dashboard without the daemon)'),
          },
        },
      },
      '/api/sensors': {
        get: {
          summary:
            'Every sensor: state, last values, intervals, QC, faults, battery trend, calibrations, field log',
          operationId: 'getSensors',
          responses: { '200': json('Sensors', 'the sensors') },
        },
      },
      '/api/fieldlog': {
        get: {
          summary: 'The calibration file and the field log of the site',
          operationId: 'getFieldLog',
          responses: { '200': json('FieldLog', 'calibrations and field-log entries') },
        },
      },
      '/api/events': {
        get: {
          summary:
            'Server-sent events: `records` (an array of Record), `alert` (an Alert, on every change including ' +
            'acknowledgements from any path), `notice` ({title, body?, severity?, t})',
          operationId: 'getEvents',
          responses: {
            '200': {
              description: 'an event stream',
              content: { 'text/event-stream': { schema: { type: 'string' } } },
            },
          },
        },
      },
    },
  };
  return cached;
}
