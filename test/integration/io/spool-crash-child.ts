// Child process for spool-crash.test.ts: the database is unreachable (a closed port), so every flushed
// record is in the spool. Prints the number of records flushed after each flush resolved; killed with -9.
import pino from 'pino';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { oxygenRecords } from './fixtures.js';

const [spoolDir, port] = process.argv.slice(2);
if (spoolDir === undefined || port === undefined)
  throw new Error('usage: spool-crash-child.ts SPOOL_DIR PORT');
const sink = await createInfluxSink({
  url: `http://127.0.0.1:${port}`,
  api: 'v1',
  batchSize: 50,
  flushMs: 10,
  spoolDir,
  spoolMaxMb: 64,
  logger: pino({ level: 'silent' }),
  backoff: { baseMs: 50, maxMs: 200 },
});
for (let i = 0; ; i += 25) {
  sink.write(oxygenRecords(25, { site: 'crash-reef', fromIndex: i }));
  await sink.flush();
  process.stdout.write(`${i + 25}\n`);
}
