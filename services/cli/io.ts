// The CLI's view of the outside: every command writes through this, so tests capture output without spawning.

export interface CliIo {
  /** Writes to standard output (no newline added). */
  stdout(text: string): void;
  /** Writes to standard error (no newline added). */
  stderr(text: string): void;
  /** Environment variables (process.env in production, a plain object in tests). */
  env: Readonly<Record<string, string | undefined>>;
  /** True when stdout is a terminal (pretty output, progress bars). */
  isTty: boolean;
}

/** Every command module under services/cli/commands/ exports one of these as `run`. Returns the exit code. */
export type CommandRun = (args: string[], io: CliIo) => Promise<number>;

/** Exit codes shared by all commands. */
export const EXIT_OK = 0;
export const EXIT_FAILURE = 1;
export const EXIT_USAGE = 2;
