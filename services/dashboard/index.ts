// The live dashboard served by the daemon (plain node:http, Server-Sent Events, uPlot in the browser).
export { createDashboardServer, type DashboardOptions, type DashboardServer } from './server.js';
export { RecordHistory, seriesKey, HISTORY_WINDOW_MS, HISTORY_RESOLUTION_MS } from './history.js';
export { HistoryLog } from './history-log.js';
export { AlertBook, alertIdOf, type AckStore } from './alert-book.js';
export { SensorWatch, type SensorHealthRow } from './sensor-watch.js';
export {
  historyRecordQuery,
  recordStoreQuery,
  type RecordFilter,
  type RecordPage,
  type RecordQuery,
} from './record-query.js';
export { openApiDocument } from './openapi.js';
export type { AlertView, SensorView, SiteInfo } from './api-schemas.js';
