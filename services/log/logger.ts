// pino logging for every service: JSON by default, pretty on a terminal. Secrets never reach a log line:
// fields named like secrets are redacted wherever they appear.
import { pino, type Logger, type LevelWithSilent } from 'pino';
import { errorCode } from '../../libs/contract/index.js';

export type { Logger };

export const LOG_LEVELS = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'] as const;

const REDACT = [
  'password',
  'token',
  'secret',
  '*.password',
  '*.token',
  '*.secret',
  '*.*.password',
  '*.*.token',
  'authorization',
  '*.authorization',
  'headers.authorization',
];

export interface LoggerOptions {
  level?: LevelWithSilent;
  pretty?: boolean;
  /** Destination file descriptor (default 2: logs go to stderr so stdout stays for NDJSON output). */
  fd?: number;
}

export function createLogger(opts: LoggerOptions = {}): Logger {
  const level = opts.level ?? 'info';
  const fd = opts.fd ?? 2;
  if (opts.pretty) {
    return pino({
      level,
      redact: { paths: REDACT, censor: '[redacted]' },
      transport: {
        target: 'pino-pretty',
        options: { destination: fd, colorize: true, translateTime: 'SYS:HH:MM:ss' },
      },
    });
  }
  return pino(
    { level, redact: { paths: REDACT, censor: '[redacted]' } },
    pino.destination({ fd, sync: false }),
  );
}

/**
 * The fields of a log line about an error: the error itself (pino keeps its message, stack and cause) and its
 * stable code beside it, so a log search can select by code (`REEFD_...`, or a system code such as ENOSPC).
 */
export function errFields(err: unknown): { err: unknown; code?: string } {
  const code = errorCode(err);
  return code === undefined ? { err } : { err, code };
}
