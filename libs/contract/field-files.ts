// The two YAML files a configuration may name beside it (docs/contract-v1.md 3.3, 3.4): the calibration
// file (`calibration_file`) and the field logbook (`logbook_file`). Their entries' schemas live with the
// rest of the contract; reading, checking against a configuration and using them is libs/calibration and
// libs/logbook.
import { z } from 'zod';
import { ID_PATTERN } from './ids.js';

const isoTime = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/, {
    error: 'is not an ISO 8601 time with a zone (e.g. 2026-07-14T00:00:00Z)',
  })
  .refine((s) => Number.isFinite(Date.parse(s)), { error: 'is not a valid time' });
// The files are read with the YAML 1.2 core schema, where a timestamp stays a string.
const time = isoTime;
const finite = z.number().refine(Number.isFinite, { error: 'must be a finite number' });
const id = z.string().regex(ID_PATTERN, { error: 'must match [A-Za-z0-9][A-Za-z0-9_.-]{0,63}' });

/** One correction of one message field of one sensor (docs/contract-v1.md 3.3). */
export const calibrationEntrySchema = z
  .strictObject({
    sensor: z.string().refine(
      (s) => {
        const [st, se, ...rest] = s.split('/');
        return rest.length === 0 && ID_PATTERN.test(st ?? '') && ID_PATTERN.test(se ?? '');
      },
      { error: 'must be <station>/<sensor>, e.g. back/co2' },
    ),
    field: z.string().regex(/^[a-z][A-Za-z0-9_]{0,63}$/, { error: 'must be a message field name' }),
    from: time.optional(),
    to: time.optional(),
    slope: finite.default(1),
    offset: finite.default(0),
    drift_per_day: finite.default(0),
    slope_drift_per_day: finite.default(0),
  })
  .refine((e) => e.from === undefined || e.to === undefined || Date.parse(e.from) < Date.parse(e.to), {
    error: '`from` must be before `to`',
    path: ['to'],
  });

export const calibrationFileSchema = z.array(calibrationEntrySchema).max(10_000);
export type CalibrationEntry = z.infer<typeof calibrationEntrySchema>;
export type CalibrationEntryInput = z.input<typeof calibrationEntrySchema>;

export const LOGBOOK_EVENTS = ['cleaning', 'swap', 'relevel', 'deploy', 'recover', 'note'] as const;
export type LogbookEvent = (typeof LOGBOOK_EVENTS)[number];

/** One field event; data of the station (or sensor) in [exclude_from, exclude_to) is excluded (3.4). */
export const logbookEntrySchema = z
  .strictObject({
    t: time,
    station: id,
    sensor: id.optional(),
    event: z.enum(LOGBOOK_EVENTS, { error: `must be one of ${LOGBOOK_EVENTS.join(', ')}` }),
    text: z.string().max(2000).optional(),
    exclude_from: time.optional(),
    exclude_to: time.optional(),
  })
  .superRefine((e, ctx) => {
    if ((e.exclude_from === undefined) !== (e.exclude_to === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: [e.exclude_from === undefined ? 'exclude_from' : 'exclude_to'],
        message: 'an exclusion needs both exclude_from and exclude_to',
      });
    } else if (
      e.exclude_from !== undefined &&
      !(Date.parse(e.exclude_from) < Date.parse(e.exclude_to as string))
    ) {
      ctx.addIssue({ code: 'custom', path: ['exclude_to'], message: 'must be after exclude_from' });
    }
  });

export const logbookFileSchema = z.array(logbookEntrySchema).max(100_000);
export type LogbookEntry = z.infer<typeof logbookEntrySchema>;
