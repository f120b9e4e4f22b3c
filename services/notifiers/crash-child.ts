// Child process of crash.test.ts: enqueues alerts forever and prints the number of each one once enqueue()
// has resolved (i.e. after fsync), until it is killed.
import { createDashboardChannel, createNotifier } from './index.js';
import { alert, idleTimers } from './test-helpers.js';

const dir = process.argv[2];
if (dir === undefined) throw new Error('usage: crash-child.ts DIR');
const n = createNotifier({
  dir,
  site: 'demo-reef',
  timers: idleTimers,
  channels: [createDashboardChannel('ui', () => undefined)],
});
await n.start();
for (let i = 0; ; i++) {
  await n.enqueue(alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: `s${i}` }));
  process.stdout.write(`${i}\n`);
}
