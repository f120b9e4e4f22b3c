// Webhook channel: the message as JSON in a POST (fetch). With a secret, the body is signed with HMAC-SHA256
// (RFC 2104) over "<timestamp>.<body>" and sent as `X-Reefd-Signature: v1=<hex>` plus `X-Reefd-Timestamp`
// (unix seconds), so a receiver can check both origin and freshness.

import { createHmac } from 'node:crypto';
import { NotifyError } from '../retry.js';
import type { Channel } from './types.js';
import type { NotificationMessage } from '../messages.js';

export const SIGNATURE_HEADER = 'X-Reefd-Signature';
export const TIMESTAMP_HEADER = 'X-Reefd-Timestamp';

export interface WebhookOptions {
  readonly id: string;
  readonly url: string;
  readonly secret?: string;
  readonly timeoutMs?: number;
  readonly site: string;
  /** Wall clock for the signature timestamp, ms. */
  readonly now?: () => number;
  readonly fetch?: typeof fetch;
  readonly minSeverity?: Channel['minSeverity'];
}

/** The signature a receiver should compute: hex HMAC-SHA256 of `${timestamp}.${body}`. */
export function webhookSignature(secret: string, timestamp: string, body: string): string {
  return createHmac('sha256', secret).update(`${timestamp}.${body}`).digest('hex');
}

export function createWebhookChannel(o: WebhookOptions): Channel {
  const doFetch = o.fetch ?? fetch;
  const now = o.now ?? Date.now;
  return {
    id: o.id,
    ...(o.minSeverity ? { minSeverity: o.minSeverity } : {}),
    async send(m: NotificationMessage) {
      const body = JSON.stringify({
        type: 'reefd.notification',
        site: o.site,
        kind: m.kind,
        subject: m.subject,
        text: m.text,
        count: m.alerts.length,
        alerts: m.alerts,
      });
      const headers: Record<string, string> = { 'content-type': 'application/json' };
      if (o.secret !== undefined) {
        const ts = String(Math.floor(now() / 1000));
        headers[TIMESTAMP_HEADER] = ts;
        headers[SIGNATURE_HEADER] = `v1=${webhookSignature(o.secret, ts, body)}`;
      }
      let res: Response;
      try {
        res = await doFetch(o.url, {
          method: 'POST',
          headers,
          body,
          signal: AbortSignal.timeout(o.timeoutMs ?? 10_000),
        });
      } catch (err) {
        throw new NotifyError(
          'REEFD_NOTIFY_WEBHOOK_UNREACHABLE',
          `POST ${o.url} failed: ${(err as Error).message}`,
          true,
          {
            cause: err,
          },
        );
      }
      await res.arrayBuffer().catch(() => undefined); // drain so the connection can be reused
      if (res.ok) return;
      const retriable = res.status >= 500 || res.status === 429 || res.status === 408;
      throw new NotifyError(
        'REEFD_NOTIFY_WEBHOOK_STATUS',
        `POST ${o.url} answered ${res.status}${retriable ? '' : '; check the URL and the receiver'}`,
        retriable,
      );
    },
  };
}
