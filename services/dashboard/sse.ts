// Server-Sent Events fan-out (the WHATWG HTML "server-sent events" format): one text/event-stream per
// browser, a comment heartbeat so proxies and phones keep the connection, and a bound on what a slow
// client may buffer before it is dropped (it reconnects and reloads its history).
import type { ServerResponse } from 'node:http';

const MAX_BUFFERED_BYTES = 4 * 1024 * 1024;

export class SseHub {
  readonly #clients = new Set<ServerResponse>();
  readonly #timer: NodeJS.Timeout;

  constructor(heartbeatMs = 15_000) {
    this.#timer = setInterval(() => this.#write(': ping\n\n'), heartbeatMs);
    this.#timer.unref();
  }

  add(res: ServerResponse): void {
    res.writeHead(200, {
      'content-type': 'text/event-stream; charset=utf-8',
      'cache-control': 'no-store',
      connection: 'keep-alive',
      'x-accel-buffering': 'no',
    });
    res.write('retry: 3000\n\n');
    this.#clients.add(res);
    res.on('close', () => this.#clients.delete(res));
  }

  send(event: string, data: unknown): void {
    this.#write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
  }

  #write(chunk: string): void {
    for (const res of this.#clients) {
      if (res.writableLength > MAX_BUFFERED_BYTES) {
        res.destroy();
        this.#clients.delete(res);
        continue;
      }
      res.write(chunk);
    }
  }

  get size(): number {
    return this.#clients.size;
  }

  close(): void {
    clearInterval(this.#timer);
    for (const res of this.#clients) res.end();
    this.#clients.clear();
  }
}
