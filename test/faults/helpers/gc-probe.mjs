/* global process, setImmediate */
// Preloaded into a daemon child by the fault cases that measure memory (node --expose-gc --import this):
// on SIGUSR2 it collects garbage until the heap stops shrinking (two readings within 1 % or 256 kB, at most
// 20 rounds, the event loop turning between them so finalizers and weak callbacks run), then prints one
// line `reefd-gc-probe {"heapUsed":...,"external":...,"arrayBuffers":...,"rss":...,"rounds":...}` on stderr.
// Test-only: the daemon itself has no such hook.
const turn = () => new Promise((r) => setImmediate(r));
process.on('SIGUSR2', async () => {
  if (typeof globalThis.gc !== 'function') {
    process.stderr.write('reefd-gc-probe {"error":"run node with --expose-gc"}\n');
    return;
  }
  let prev = Infinity;
  let rounds = 0;
  for (; rounds < 20; rounds++) {
    globalThis.gc();
    await turn();
    globalThis.gc();
    await turn();
    const used = process.memoryUsage().heapUsed;
    if (Math.abs(prev - used) < Math.max(256 * 1024, 0.01 * used)) break;
    prev = used;
  }
  const m = process.memoryUsage();
  process.stderr.write(
    `reefd-gc-probe ${JSON.stringify({ heapUsed: m.heapUsed, external: m.external, arrayBuffers: m.arrayBuffers, rss: m.rss, rounds })}\n`,
  );
});
