// Optional access token for LAN use: `Authorization: Bearer <token>` or `?token=<token>`, compared in
// constant time. Both sides are hashed first so that the comparison does not leak the token's length.
import { createHash, timingSafeEqual } from 'node:crypto';
import type { IncomingMessage } from 'node:http';

const digest = (s: string) => createHash('sha256').update(s, 'utf8').digest();

export function tokenMatches(expected: string, given: string | undefined): boolean {
  if (given === undefined) return false;
  return timingSafeEqual(digest(expected), digest(given));
}

export function requestToken(req: IncomingMessage, url: URL): string | undefined {
  const h = req.headers.authorization;
  if (typeof h === 'string') {
    const m = /^Bearer\s+(.+)$/i.exec(h.trim());
    if (m) return m[1];
  }
  return url.searchParams.get('token') ?? undefined;
}
