// Child process for archive-crash.test.ts: appends archive lines without end, 64 in flight, and prints the
// seq of every append whose promise resolved (i.e. whose fsync completed). The parent kills it with -9.
// Odd seqs go through appendMessage (the payload bytes spliced into the line), even ones through append.
import { archiveLine } from '../../../libs/contract/index.js';
import { createArchiveWriter } from '../../../services/archive/index.js';

const dir = process.argv[2];
if (dir === undefined) throw new Error('usage: archive-crash-child.ts DIR');
const w = await createArchiveWriter({ dir, fsyncMs: 5, retentionDays: 0, clock: Date.now });
let seq = 0;
const pad = 'x'.repeat(200);
async function lane(): Promise<void> {
  for (;;) {
    const s = seq++;
    const now = Date.now();
    const payload = JSON.stringify({ v: 1, seq: s, pad });
    if (s % 2 === 1)
      await w.appendMessage({
        topic: 'reef/s/st/ctd/c1',
        rxMs: now,
        payload: Buffer.from(payload),
        json: true,
      });
    else await w.append(archiveLine('reef/s/st/ctd/c1', new Date(now).toISOString(), payload), now);
    process.stdout.write(`${s}\n`);
  }
}
await Promise.all(Array.from({ length: 64 }, () => lane()));
