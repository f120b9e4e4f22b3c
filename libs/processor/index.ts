// Public API of the processor: the pure, event-time state machine shared by `reefd run`, `reefd replay` and tests.
export {
  createProcessor,
  MAX_CLOCK_LEAD_MS,
  type Processor,
  type PushResult,
  type PushStatus,
  type ProcessorOptions,
  type SensorHealthRow,
} from './processor.js';
export { exclusionsOf, type FaultExclusion } from './faults.js';
export { STATE_VERSION, type ProcessorState, type ProcessorCounters } from './state.js';
export { checkAgainstConfig, messageFromArchiveLine, type ArchiveInput } from './intake.js';
export { inRangeWithMargins, rangeMargins, type RangeMargins } from './range.js';
