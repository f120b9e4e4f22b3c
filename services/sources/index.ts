// Message sources: MQTT (persistent session, PUBACK after the archive) and Kafka (offsets after ack).
export { createMqttSource, type MqttSource, type MqttSourceOptions } from './mqtt-source.js';
export { createKafkaSource, type KafkaSource, type KafkaSourceOptions } from './kafka-source.js';
export { kafkaTopicOf } from './kafka-topic.js';
