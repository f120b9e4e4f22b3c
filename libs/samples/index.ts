// Public API of libs/samples: reading and checking lab result sheets for `reefd samples import`.
export { parseCsv, type CsvParse, type CsvRow } from './csv.js';
export {
  checkSheet,
  ID_COLUMNS,
  PLAUSIBLE,
  SPAN_MARGIN_MS,
  VALUE_COLUMNS,
  type AcceptedRow,
  type ArchiveFacts,
  type SheetCheck,
} from './check.js';
