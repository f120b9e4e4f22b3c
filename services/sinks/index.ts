// Outputs for derived records and dead letters. Every RecordSink passes test/integration/sink-contract.ts.
export { createInfluxSink, type InfluxSink, type InfluxSinkOptions } from './influx-sink.js';
export { createKafkaSink, kafkaKey, orderedKafkaSender, type KafkaSinkOptions } from './kafka-sink.js';
export { createNdjsonSink, type NdjsonSinkOptions } from './ndjson-sink.js';
export {
  createDeadLetterSink,
  mqttPublisher,
  kafkaPublisher,
  type DeadLetterOptions,
  type TopicPublisher,
} from './dead-letter.js';
export { SpooledSink, type SpooledSinkOptions } from './spooled-sink.js';
