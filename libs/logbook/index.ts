// Public API of libs/logbook: the field logbook file and the exclusion lookup (docs/methods/calibration.md 13.6).
export {
  buildExclusionIndex,
  checkLogbook,
  exclusionAt,
  exclusionsDuring,
  formatLogbookEntry,
  LOGBOOK_EVENTS,
  LOGBOOK_EXCLUSION_REASON,
  logbookEntrySchema,
  logbookFileSchema,
  parseLogbookText,
  type ExclusionIndex,
  type LogbookEntry,
  type LogbookEvent,
  type LogbookParse,
  type LogbookProblem,
} from './logbook.js';
export { logbookMarkers, type LogbookMarker, type MarkerQuery } from './markers.js';
export { LOGBOOK_ERRORS, type LogbookErrorCode } from './errors.js';
