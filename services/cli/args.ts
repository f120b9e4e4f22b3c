// Argument parsing shared by the commands: node's parseArgs plus the house rules (--help prints the help and
// exits 0; anything unparsable prints the reason and the help and exits 2).
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { EXIT_OK, EXIT_USAGE, type CliIo } from './io.js';

type Options = NonNullable<ParseArgsConfig['options']>;

export type Parsed<O extends Options> =
  | { ok: true; values: ReturnType<typeof parseArgs<{ args: string[]; options: O }>>['values'] }
  | { ok: false; exit: number };

export function parseCommand<O extends Options>(
  name: string,
  args: string[],
  options: O,
  help: string,
  io: CliIo,
): Parsed<O> {
  let values;
  try {
    ({ values } = parseArgs({ args, options: { ...options, help: { type: 'boolean', short: 'h' } } }));
  } catch (err) {
    io.stderr(`reefd ${name}: ${(err as Error).message}\n\n${help}`);
    return { ok: false, exit: EXIT_USAGE };
  }
  if ((values as { help?: boolean }).help) {
    io.stdout(help);
    return { ok: false, exit: EXIT_OK };
  }
  return { ok: true, values: values as never };
}
