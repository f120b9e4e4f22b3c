// The v1 contract in code: ids and topics, sensor messages, archive lines, configuration, derived records.
export * from './ids.js';
export * from './messages.js';
export * from './archive.js';
export * from './records.js';
export * from './record-types.js';
export * from './config-schema.js';
export * from './alert-config-schema.js';
export * from './alert-metrics.js';
export * from './config-parse.js';
export * from './config-json-schema.js';
export * from './errors.js';
export * from './field-files.js';
