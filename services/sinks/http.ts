// A small HTTP(S) POST on node:http/https, so TLS files from the configuration (ca/cert/key, verify) apply
// without a separate agent library. Statuses are classified here: 5xx, 408 and 429 are retriable; 401, 403
// and 404 (credentials refused, database or bucket missing) are retriable with an alert (REEFD_SINK_AUTH):
// a rotated token or a database not yet created must not lose data; other 4xx are refusals of the data
// (never retried).
import { request as plainRequest, type IncomingHttpHeaders } from 'node:http';
import { request as httpsRequest } from 'node:https';
import { ReefdError } from '../../libs/contract/index.js';
import type { TlsOptions } from '../transport/tls.js';

export interface HttpResponse {
  status: number;
  headers: IncomingHttpHeaders;
  body: string;
}

/**
 * True when a failed request may still have been applied: the body may have reached the server but no
 * answer came back (a timeout, a connection reset). A refused connection or a status answer is not.
 */
export function mayHaveLanded(err: unknown): boolean {
  const code = (err as { code?: unknown } | null)?.code;
  if (err instanceof ReefdError) return false;
  return !(
    code === 'ECONNREFUSED' ||
    code === 'ENOTFOUND' ||
    code === 'EAI_AGAIN' ||
    code === 'EHOSTUNREACH'
  );
}

export interface HttpOptions {
  timeoutMs: number;
  tls?: TlsOptions;
  /** Keep at most this much of the answer (default 4 kB: error bodies are for the log only). */
  maxBodyBytes?: number;
}

function httpRequest(
  method: 'GET' | 'POST',
  url: URL,
  body: Buffer | undefined,
  headers: Record<string, string>,
  opts: HttpOptions,
): Promise<HttpResponse> {
  const request = url.protocol === 'https:' ? httpsRequest : plainRequest;
  const keep = opts.maxBodyBytes ?? 4096;
  return new Promise((resolve, reject) => {
    const req = request(
      url,
      {
        method,
        headers: body === undefined ? headers : { ...headers, 'content-length': String(body.length) },
        timeout: opts.timeoutMs,
        ...(url.protocol === 'https:' ? (opts.tls ?? {}) : {}),
      },
      (res) => {
        const chunks: Buffer[] = [];
        let size = 0;
        res.on('data', (c: Buffer) => {
          if (size < keep) chunks.push(c);
          size += c.length;
        });
        res.on('end', () =>
          resolve({
            status: res.statusCode ?? 0,
            headers: res.headers,
            body: Buffer.concat(chunks).subarray(0, keep).toString('utf8'),
          }),
        );
        res.on('error', reject);
      },
    );
    req.on('timeout', () =>
      req.destroy(Object.assign(new Error(`no answer within ${opts.timeoutMs} ms`), { code: 'ETIMEDOUT' })),
    );
    req.on('error', reject);
    req.end(body);
  });
}

export function httpPost(
  url: URL,
  body: Buffer,
  headers: Record<string, string>,
  opts: HttpOptions,
): Promise<HttpResponse> {
  return httpRequest('POST', url, body, headers, opts);
}

export function httpGetText(
  url: URL,
  headers: Record<string, string>,
  opts: HttpOptions,
): Promise<HttpResponse> {
  return httpRequest('GET', url, undefined, headers, opts);
}

/** Throws for a non-2xx answer: retriable for 5xx/408/429 (with Retry-After) and 401/403/404, a refusal otherwise. */
export function checkStatus(res: HttpResponse, what: string): void {
  if (res.status >= 200 && res.status < 300) return;
  if (res.status === 401 || res.status === 403 || res.status === 404) {
    throw new ReefdError(
      'REEFD_SINK_AUTH',
      `${what} answered HTTP ${res.status} (${res.status === 404 ? 'no such database or bucket' : 'credentials refused'}): ${res.body.slice(0, 200)}`,
      { retriable: true, detail: { status: res.status, body: res.body.slice(0, 500) } },
    );
  }
  const retriable = res.status >= 500 || res.status === 408 || res.status === 429;
  const ra = Number(res.headers['retry-after']);
  const detail: Record<string, unknown> = { status: res.status, body: res.body.slice(0, 500) };
  if (Number.isFinite(ra) && ra > 0) detail.retryAfterMs = Math.min(ra * 1000, 300_000);
  throw new ReefdError(
    'REEFD_SINK_UNAVAILABLE',
    `${what} answered HTTP ${res.status}: ${res.body.slice(0, 200)}`,
    {
      retriable,
      detail,
    },
  );
}
