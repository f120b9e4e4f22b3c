// The raw archive: writer (group commit, daily rotation, gzip, retention) and reader.
export {
  createArchiveWriter,
  type ArchiveWriterOptions,
  type ArchiveWriterStats,
  type RawArchiveWriter,
} from './writer.js';
export { readArchive, listArchiveFiles, type ArchiveEntry } from './reader.js';
export { archiveLineBytes, parsedAsJson, type ArchiveMessage } from './line.js';
export { archiveLine } from '../../libs/contract/index.js';
export { plainName, dayOf } from './files.js';
