// Small HTTP helpers of the dashboard server: responses with the security headers, bounded bodies, and a
// listen that moves to the next free port when asked to.
import type { IncomingMessage, Server, ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';

export const SECURITY_HEADERS = {
  'x-content-type-options': 'nosniff',
  'x-frame-options': 'DENY',
  'referrer-policy': 'no-referrer',
  'content-security-policy':
    "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'",
};

export function send(
  res: ServerResponse,
  status: number,
  body: string | Buffer,
  type = 'application/json; charset=utf-8',
): void {
  res.writeHead(status, { 'content-type': type, 'cache-control': 'no-store', ...SECURITY_HEADERS });
  res.end(body);
}

export const json = (res: ServerResponse, status: number, value: unknown): void =>
  send(res, status, JSON.stringify(value));

export const fail = (res: ServerResponse, status: number, error: string, message: string): void =>
  json(res, status, { error, message });

export async function readBody(req: IncomingMessage, limit: number): Promise<string> {
  let size = 0;
  const chunks: Buffer[] = [];
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > limit) throw Object.assign(new Error('body too large'), { status: 413 });
    chunks.push(chunk as Buffer);
  }
  return Buffer.concat(chunks).toString('utf8');
}

/** Listens on `port`; with attempts > 0 tries the next ports, then any free one, when it is taken. */
export async function listen(server: Server, host: string, port: number, attempts: number): Promise<number> {
  const tryPort = (p: number) =>
    new Promise<number>((resolve, reject) => {
      const onError = (err: NodeJS.ErrnoException) => {
        server.off('listening', onListening);
        reject(err);
      };
      const onListening = () => {
        server.off('error', onError);
        resolve((server.address() as AddressInfo).port);
      };
      server.once('error', onError);
      server.once('listening', onListening);
      server.listen(p, host);
    });
  const candidates =
    port === 0 || attempts === 0
      ? [port]
      : [...Array.from({ length: attempts + 1 }, (_, i) => port + i).filter((p) => p <= 65535), 0];
  let last: unknown;
  for (const p of candidates) {
    try {
      return await tryPort(p);
    } catch (err) {
      last = err;
      if ((err as NodeJS.ErrnoException).code !== 'EADDRINUSE') throw err;
    }
  }
  throw last;
}
