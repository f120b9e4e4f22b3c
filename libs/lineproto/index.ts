// Line protocol encoding of derived records: pure, no I/O.
export { escapeMeasurement, escapeKey, quoteFieldString, type Dialect } from './escape.js';
export {
  recordToPoint,
  formatPoint,
  recordToLine,
  type Point,
  type PointResult,
  type FieldValue,
} from './point.js';
