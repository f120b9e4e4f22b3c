// Types of the page's JavaScript (checked with `// @ts-check`, no build step): the records come from the
// contract, the API answers from the zod schemas the server answers with, uPlot from its own declarations
// (a global script: its declaration file is referenced by path, as the package names no types entry).
// eslint-disable-next-line @typescript-eslint/triple-slash-reference
/// <reference path="../../../node_modules/uplot/dist/uPlot.d.ts" />
import type { DerivedRecord } from '../../../libs/contract/index.js';
import type { SiteInfo } from '../api-schemas.js';

export type { DerivedRecord, RecordType } from '../../../libs/contract/index.js';
export type {
  AlertView,
  FieldLog,
  HistoryBody,
  LogbookEntry,
  SensorState,
  SensorView,
  SensorsBody,
  SiteInfo,
} from '../api-schemas.js';

export type SiteRule = SiteInfo['rules'][number];
export type SiteStation = SiteInfo['stations'][number];
export type FieldInfo = SiteInfo['record_types'][string]['fields'][string];

/** A record as the page handles it: any record type, fields read by name. */
export type Rec = DerivedRecord & Record<string, unknown>;
