// The table of sensor kinds: one module per kind of the contract (libs/contract KINDS). A kind missing here,
// or a module missing a piece, is a compile error; the processor reads everything per kind from this table.
import type { Kind } from '../../contract/index.js';
import type { SiteVar, StationVar } from '../state.js';
import { adcp } from './adcp.js';
import { ctd } from './ctd.js';
import { met } from './met.js';
import { oxygen } from './oxygen.js';
import { par } from './par.js';
import { pco2 } from './pco2.js';
import { pressure } from './pressure.js';
import { sample } from './sample.js';
import type { KindTable, MessageOf } from './types.js';

export const KIND_MODULES = {
  ctd,
  oxygen,
  pco2,
  pressure,
  adcp,
  par,
  met,
  sample,
} as const satisfies KindTable;

/** The same table, indexed by a kind known only at run time (a message's). */
export const kindModules: KindTable = KIND_MODULES;

// Every kind has its message type in libs/contract SensorMessage (else its module's `derive` would take `never`).
type WithoutMessage = { [K in Kind]: [MessageOf<K>] extends [never] ? K : never }[Kind];
const _everyKindHasAMessage: [WithoutMessage] extends [never] ? true : WithoutMessage = true;

// Every series of the state is written by some kind: a series no kind writes would stay empty forever.
// (A compile error here names the series; add it to the `writes` of the kind that produces it.)
type Written<T extends 'station' | 'site'> = (typeof KIND_MODULES)[Kind]['writes'][T][number];
type Unwritten = Exclude<StationVar, Written<'station'>> | Exclude<SiteVar, Written<'site'>>;
const _everySeriesWritten: [Unwritten] extends [never] ? true : Unwritten = true;

export type { KindIO, KindModule, KindTable, MessageOf, SensorConfigOf, StateRefs } from './types.js';
