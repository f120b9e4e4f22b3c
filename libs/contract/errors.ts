// One error shape for all of reefd: a ReefdError carries a stable `code` a caller can branch on, whether a
// retry can help (`retriable`, marked where the error is made), a `detail` object with the offending path or
// value, and the `cause`. Every package builds its catalogue with defineErrors(): the codes with what is
// wrong and how to fix it, and a typed constructor that only takes the package's own codes.
// docs/errors.md lists every code of every catalogue; test/unit/error-codes.test.ts scans libs/ and
// services/ and keeps the code, the catalogues and that page in step. Catalogues import this file itself, not
// the contract's index: the index reaches libs/ packages that load their own catalogues, and the cycle would
// leave defineErrors undefined while they load. This file imports nothing.

export interface ErrorOptions {
  /** Overrides the catalogue's mark for this one error (an HTTP 400 is not retriable, a 503 is). */
  retriable?: boolean;
  detail?: Record<string, unknown>;
  cause?: unknown;
}

export class ReefdError<C extends string = string> extends Error {
  readonly code: C;
  readonly retriable: boolean;
  readonly detail: Record<string, unknown> | undefined;

  constructor(code: C, message?: string, opts: ErrorOptions = {}) {
    super(message ?? coreText(code) ?? code, opts.cause !== undefined ? { cause: opts.cause } : undefined);
    this.name = 'ReefdError';
    this.code = code;
    this.retriable = opts.retriable ?? false;
    this.detail = opts.detail;
  }
}

/** One entry: the text (what is wrong, how to fix it) and whether a retry of the failed step can help. */
export interface ErrorEntry {
  readonly text: string;
  readonly retriable: boolean;
}

/** An entry as written in a catalogue: the text alone (not retriable) or with its retriable mark. */
export type ErrorEntryInput = string | { readonly text: string; readonly retriable?: boolean };

export interface ErrorCatalogue<C extends string> {
  /** Which package the catalogue belongs to (`libs/qc`, `services/sinks`), for docs/errors.md. */
  readonly owner: string;
  readonly codes: readonly C[];
  readonly entries: Readonly<Record<C, ErrorEntry>>;
  /** The catalogue text of a code. */
  text(code: C): string;
  /**
   * The typed constructor: `what` says what happened in this case; the message is `CODE: what; text`, so
   * a log line or a CLI message names the code, the case and the fix. Retriable as the catalogue says
   * unless `opts.retriable` says otherwise.
   */
  error(code: C, what?: string, opts?: ErrorOptions): ReefdError<C>;
  /** True for an error of this catalogue (and of that code, when given). */
  is(err: unknown, code?: C): err is ReefdError<C>;
}

const CODE = /^REEFD_[A-Z0-9]+(?:_[A-Z0-9]+)*$/;

/** The message of a catalogued error: the code, the case, and the catalogue's fix. */
export function errorMessage(code: string, what: string | undefined, text: string): string {
  return what === undefined || what === '' ? `${code}: ${text}` : `${code}: ${what}; ${text}`;
}

/**
 * Builds a package's error catalogue. Codes are `REEFD_<AREA>_<WHAT>` (the core's oldest, `REEFD_USAGE`, is one word); a code whose text is missing or a
 * malformed code fails at module load, so a catalogue that loads is well formed.
 */
export function defineErrors<const T extends Record<string, ErrorEntryInput>>(
  owner: string,
  input: T,
): ErrorCatalogue<Extract<keyof T, string>> {
  type C = Extract<keyof T, string>;
  const entries = {} as Record<C, ErrorEntry>;
  for (const [code, e] of Object.entries(input) as [C, ErrorEntryInput][]) {
    if (!CODE.test(code))
      throw new RangeError(
        `error code ${code} is not of the form REEFD_<AREA>_<WHAT> (capitals, digits, underscores)`,
      );
    const entry =
      typeof e === 'string' ? { text: e, retriable: false } : { text: e.text, retriable: !!e.retriable };
    if (entry.text.trim().length < 10)
      throw new RangeError(`error code ${code} needs a text saying how to fix it`);
    entries[code] = Object.freeze(entry);
  }
  const codes = Object.freeze(Object.keys(entries) as C[]);
  const known = new Set<string>(codes);
  return Object.freeze({
    owner,
    codes,
    entries: Object.freeze(entries),
    text: (code: C) => entries[code].text,
    error: (code: C, what?: string, opts: ErrorOptions = {}) =>
      new ReefdError(code, errorMessage(code, what, entries[code].text), {
        ...opts,
        retriable: opts.retriable ?? entries[code].retriable,
      }),
    is: (err: unknown, code?: C): err is ReefdError<C> =>
      err instanceof ReefdError && known.has(err.code) && (code === undefined || err.code === code),
  });
}

/** True for a value built by defineErrors (the code scan finds the catalogues by it). */
export function isErrorCatalogue(v: unknown): v is ErrorCatalogue<string> {
  const c = v as Partial<ErrorCatalogue<string>> | null;
  return (
    typeof c === 'object' &&
    c !== null &&
    typeof c.owner === 'string' &&
    Array.isArray(c.codes) &&
    typeof c.error === 'function' &&
    typeof c.is === 'function'
  );
}

/** The core catalogue: configuration, command line, inputs, outputs, sources, the data folder. */
export const CORE_ERRORS = defineErrors('libs/contract', {
  REEFD_CONFIG_INVALID:
    'The configuration file has problems; each is printed with its path. Fix them and re-run.',
  REEFD_CONFIG_UNREADABLE: 'The configuration file could not be read; check the path and its permissions.',
  REEFD_SECRET_MISSING:
    'A secret named in the configuration ({env: NAME} or {file: PATH}) is not available; set the variable, create the file, or (under systemd) give it with LoadCredential.',
  REEFD_SECRET_PERMISSIONS:
    'A secret file is readable by group or others; restrict it with `chmod 600 FILE` so no other user can read it.',
  REEFD_USAGE: 'The command line is not valid; see `reefd <command> --help`.',
  REEFD_INPUT_MISSING: 'An input file or folder named on the command line does not exist.',
  REEFD_SINK_UNAVAILABLE: {
    text: 'An output (database, Kafka) is not reachable; records are spooled on disk and retried.',
    retriable: true,
  },
  REEFD_SINK_AUTH: {
    text: 'An output refused the credentials or does not know the database (HTTP 401/403/404); records are spooled and retried: fix the token or create the database.',
    retriable: true,
  },
  REEFD_NO_SOURCE:
    'The configuration has no `sources` section, so `reefd run` would receive nothing; add sources.mqtt or sources.kafka.',
  REEFD_SOURCE_UNAVAILABLE: {
    text: 'The broker or Kafka source is not reachable; reefd keeps retrying with backoff.',
    retriable: true,
  },
  REEFD_DISK_FULL: {
    text: 'The data folder has no space left; free space there. Nothing already written is lost.',
    retriable: true,
  },
  REEFD_SPOOL_NEAR_LIMIT:
    'The database spool is close to its size bound; bring the database back or raise spool_max_mb.',
  REEFD_CHECKPOINT_CORRUPT:
    'The processor checkpoint could not be read; reefd starts cold and keeps the bad file aside.',
  REEFD_CARBONATE_NO_SOLUTION:
    'The carbonate inputs have no physical solution (e.g. DIC below CO2*); check the inputs.',
  REEFD_NOT_BUILT: 'This command is not available in this build.',
});

/** The core catalogue as code -> text (kept for the callers that read it so). */
export const ERROR_CATALOGUE: Readonly<Record<ErrorCode, string>> = Object.freeze(
  Object.fromEntries(CORE_ERRORS.codes.map((c) => [c, CORE_ERRORS.text(c)])) as Record<ErrorCode, string>,
);

export type ErrorCode = (typeof CORE_ERRORS.codes)[number];

function coreText(code: string): string | undefined {
  return (CORE_ERRORS.codes as readonly string[]).includes(code)
    ? CORE_ERRORS.text(code as ErrorCode)
    : undefined;
}

/** The code of any error: a ReefdError's, or a Node system error's (ECONNREFUSED, ENOSPC); undefined if none. */
export function errorCode(err: unknown): string | undefined {
  const code = (err as { code?: unknown } | null)?.code;
  return typeof code === 'string' ? code : undefined;
}

/** True for errors worth retrying: those marked so, never programming errors. */
export function isRetriable(err: unknown): boolean {
  if (err instanceof TypeError || err instanceof RangeError || err instanceof SyntaxError) return false;
  if (err instanceof ReefdError) return err.retriable;
  const code = errorCode(err);
  return (
    code !== undefined &&
    ['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'EAI_AGAIN', 'ENOTFOUND'].includes(code)
  );
}
