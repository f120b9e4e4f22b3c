// Public API of libs/alerts: the alert rule engine (pure, event time) and the config schemas of `alerts:` and
// `notify:`.
export { createAlertEngine, type AlertEngine, type EngineSnapshot } from './engine.js';
export {
  createSiteSilence,
  silenceOnMessage,
  silenceCheck,
  silenceNextCheckMs,
  silenceActive,
  SITE_SILENT_RULE,
  type SiteSilenceState,
  type SiteSilenceSettings,
} from './silence.js';
export {
  DEFAULT_RULES,
  DEFAULT_BATTERY_V,
  resolveRules,
  type ResolvedRules,
  type FaultSettings,
  type BatteryTrendSettings,
} from './rules.js';
// The `alerts:` and `notify:` schemas are the contract's (libs/contract/alert-config-schema.ts); they are
// named here too because they are this package's settings.
export {
  alertsConfigSchema,
  notifyConfigSchema,
  notifyChannelSchema,
  severitySchema,
  BUILTIN_RULE_IDS,
  type AlertsConfig,
  type AlertsConfigInput,
  type NotifyConfig,
  type NotifyConfigInput,
  type NotifyChannelConfig,
  type Severity,
} from '../contract/index.js';
export type { AlertRecord, AlertClass, AlertState, FaultName, QcInfo, ThresholdRule } from './types.js';
export { alertId } from './id.js';
export { ALERTS_ERRORS, type AlertsErrorCode } from './errors.js';
