// The error catalogue of reefd: stable codes, what went wrong and how to fix it. DEVELOPERS.md lists every
// code (a test keeps the two in sync). Retriable errors are marked where they are created.

export const ERROR_CATALOGUE = {
  REEFD_CONFIG_INVALID:
    'The configuration file has problems; each is printed with its path. Fix them and re-run.',
  REEFD_CONFIG_UNREADABLE: 'The configuration file could not be read; check the path and its permissions.',
  REEFD_SECRET_MISSING: 'A secret named in the configuration ({env: NAME} or {file: PATH}) is not available.',
  REEFD_SECRET_PERMISSIONS:
    'A secret file is readable by group or others; restrict it with `chmod 600 FILE` so no other user can read it.',
  REEFD_USAGE: 'The command line is not valid; see `reefd <command> --help`.',
  REEFD_INPUT_MISSING: 'An input file or folder named on the command line does not exist.',
  REEFD_SINK_UNAVAILABLE:
    'An output (database, Kafka) is not reachable; records are spooled on disk and retried.',
  REEFD_SINK_AUTH:
    'An output refused the credentials or does not know the database (HTTP 401/403/404); records are spooled and retried: fix the token or create the database.',
  REEFD_NO_SOURCE:
    'The configuration has no `sources` section, so `reefd run` would receive nothing; add sources.mqtt or sources.kafka.',
  REEFD_SOURCE_UNAVAILABLE: 'The broker or Kafka source is not reachable; reefd keeps retrying with backoff.',
  REEFD_DISK_FULL: 'The data folder has no space left; free space there. Nothing already written is lost.',
  REEFD_SPOOL_NEAR_LIMIT:
    'The database spool is close to its size bound; bring the database back or raise spool_max_mb.',
  REEFD_CHECKPOINT_CORRUPT:
    'The processor checkpoint could not be read; reefd starts cold and keeps the bad file aside.',
  REEFD_CARBONATE_NO_SOLUTION:
    'The carbonate inputs have no physical solution (e.g. DIC below CO2*); check the inputs.',
  REEFD_NOT_BUILT: 'This command is not available in this build.',
} as const;

export type ErrorCode = keyof typeof ERROR_CATALOGUE;

export class ReefdError extends Error {
  readonly code: ErrorCode;
  readonly retriable: boolean;
  readonly detail: Record<string, unknown> | undefined;

  constructor(
    code: ErrorCode,
    message?: string,
    opts: { retriable?: boolean; detail?: Record<string, unknown>; cause?: unknown } = {},
  ) {
    super(message ?? ERROR_CATALOGUE[code], opts.cause !== undefined ? { cause: opts.cause } : undefined);
    this.name = 'ReefdError';
    this.code = code;
    this.retriable = opts.retriable ?? false;
    this.detail = opts.detail;
  }
}

/** True for errors worth retrying: those marked so, never programming errors. */
export function isRetriable(err: unknown): boolean {
  if (err instanceof TypeError || err instanceof RangeError || err instanceof SyntaxError) return false;
  if (err instanceof ReefdError) return err.retriable;
  const code = (err as { code?: unknown } | null)?.code;
  return (
    typeof code === 'string' &&
    ['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'EAI_AGAIN', 'ENOTFOUND'].includes(code)
  );
}
