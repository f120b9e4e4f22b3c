// The durable record history for `/api/records`: a store of day files and the parser of the query string.
export {
  createRecordStore,
  MAX_PAGE,
  recordsDir,
  RecordStoreError,
  type RecordPage,
  type RecordQuery,
  type RecordStore,
  type RecordStoreOptions,
} from './store.js';
export { parseRecordQuery, type ParsedQuery } from './query.js';
