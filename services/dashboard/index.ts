// The live dashboard served by the daemon (plain node:http, Server-Sent Events, uPlot in the browser).
export {
  createDashboardServer,
  type DashboardOptions,
  type DashboardServer,
  type SensorHealth,
} from './server.js';
export {
  RecordHistory,
  seriesKey,
  alertIdOf,
  HISTORY_WINDOW_MS,
  MAX_PER_SERIES,
  type AlertEntry,
} from './history.js';
