// A small HTTP(S) POST on node:http/https, so TLS files from the configuration (ca/cert/key, verify) apply
// without a separate agent library. Statuses are classified here: 5xx, 408 and 429 are retriable, other
// 4xx are refusals of the data (never retried).
import { readFileSync } from 'node:fs';
import { request as httpRequest, type IncomingHttpHeaders } from 'node:http';
import { request as httpsRequest, type RequestOptions } from 'node:https';
import { ReefdError } from '../../libs/contract/index.js';

export interface TlsFiles {
  ca_file?: string | undefined;
  cert_file?: string | undefined;
  key_file?: string | undefined;
  verify?: boolean | undefined;
}

export interface HttpResponse {
  status: number;
  headers: IncomingHttpHeaders;
  body: string;
}

/** TLS options for node:https / node:tls from the configuration's file names (read once, at start-up). */
export function tlsOptions(
  tls: TlsFiles | undefined,
): Pick<RequestOptions, 'ca' | 'cert' | 'key' | 'rejectUnauthorized'> {
  if (tls === undefined) return {};
  const o: Pick<RequestOptions, 'ca' | 'cert' | 'key' | 'rejectUnauthorized'> = {
    rejectUnauthorized: tls.verify ?? true,
  };
  if (tls.ca_file !== undefined) o.ca = readFileSync(tls.ca_file);
  if (tls.cert_file !== undefined) o.cert = readFileSync(tls.cert_file);
  if (tls.key_file !== undefined) o.key = readFileSync(tls.key_file);
  return o;
}

export function httpPost(
  url: URL,
  body: Buffer,
  headers: Record<string, string>,
  opts: { timeoutMs: number; tls?: ReturnType<typeof tlsOptions> },
): Promise<HttpResponse> {
  const request = url.protocol === 'https:' ? httpsRequest : httpRequest;
  return new Promise((resolve, reject) => {
    const req = request(
      url,
      {
        method: 'POST',
        headers: { ...headers, 'content-length': String(body.length) },
        timeout: opts.timeoutMs,
        ...(url.protocol === 'https:' ? (opts.tls ?? {}) : {}),
      },
      (res) => {
        const chunks: Buffer[] = [];
        let size = 0;
        res.on('data', (c: Buffer) => {
          // Error bodies are for the log only: keep the first 4 kB.
          if (size < 4096) chunks.push(c);
          size += c.length;
        });
        res.on('end', () =>
          resolve({
            status: res.statusCode ?? 0,
            headers: res.headers,
            body: Buffer.concat(chunks).toString('utf8').slice(0, 4096),
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

/** Throws for a non-2xx answer: retriable for 5xx/408/429 (with Retry-After), a refusal otherwise. */
export function checkStatus(res: HttpResponse, what: string): void {
  if (res.status >= 200 && res.status < 300) return;
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
