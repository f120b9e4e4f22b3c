// E-mail channel through SMTP (nodemailer). 5xx replies are permanent (bad address, refused sender); everything
// else (connection refused, time-outs, 4xx) is retriable.

import nodemailer from 'nodemailer';
import { NotifyError } from '../retry.js';
import type { Channel } from './types.js';
import type { NotificationMessage } from '../messages.js';

export interface SmtpOptions {
  readonly id: string;
  readonly host: string;
  readonly port: number;
  readonly secure: boolean;
  readonly from: string;
  readonly to: readonly string[];
  readonly auth?: { readonly user: string; readonly pass: string };
  readonly timeoutMs?: number;
  /** For tests against a local server without TLS. */
  readonly ignoreTls?: boolean;
  readonly minSeverity?: Channel['minSeverity'];
}

export function createSmtpChannel(o: SmtpOptions): Channel & { close(): void } {
  const transport = nodemailer.createTransport({
    host: o.host,
    port: o.port,
    secure: o.secure,
    ...(o.auth ? { auth: { user: o.auth.user, pass: o.auth.pass } } : {}),
    ...(o.ignoreTls ? { ignoreTLS: true } : {}),
    connectionTimeout: o.timeoutMs ?? 30_000,
    greetingTimeout: o.timeoutMs ?? 30_000,
    socketTimeout: o.timeoutMs ?? 30_000,
  });
  return {
    id: o.id,
    ...(o.minSeverity ? { minSeverity: o.minSeverity } : {}),
    async send(m: NotificationMessage) {
      try {
        await transport.sendMail({ from: o.from, to: [...o.to], subject: m.subject, text: m.text });
      } catch (err) {
        const code = (err as { responseCode?: number }).responseCode;
        const permanent = typeof code === 'number' && code >= 500;
        throw new NotifyError(
          'REEFD_NOTIFY_SMTP',
          `sending to ${o.host}:${o.port} failed: ${(err as Error).message}`,
          !permanent,
          {
            cause: err,
          },
        );
      }
    },
    close() {
      transport.close();
    },
  };
}
