// `reefd config check FILE`: validates a configuration; exit 0 with a one-line summary, 2 with every problem.
// `reefd config schema`: prints the configuration's JSON Schema (for editors; docs/reefd-config.schema.json).
import { parseArgs } from 'node:util';
import { configJsonSchema, formatProblem } from '../../../libs/contract/index.js';
import { loadConfigFile } from '../../config/load.js';
import { EXIT_OK, EXIT_USAGE, type CommandRun } from '../io.js';

const HELP = `Usage: reefd config check FILE
       reefd config schema

check   Validates a reefd configuration file (YAML). Prints every problem as
        "path: message (line N)" and exits 2, or prints a one-line summary and exits 0.
schema  Prints the JSON Schema (draft-07) of the configuration file on stdout, for
        editors: save it and name it on the first line of a site file,
        # yaml-language-server: $schema=reefd-config.schema.json
        A copy ships as docs/reefd-config.schema.json. config check also checks what
        a schema cannot (transects against their stations, time zone names).
`;

export const run: CommandRun = async (args, io) => {
  const { values, positionals } = parseArgs({
    args,
    allowPositionals: true,
    strict: false,
    options: { help: { type: 'boolean', short: 'h' } },
  });
  if (values.help) {
    io.stdout(HELP);
    return EXIT_OK;
  }
  const [sub, file, ...rest] = positionals;
  if (sub === 'schema' && file === undefined) {
    io.stdout(`${JSON.stringify(configJsonSchema(), null, 2)}\n`);
    return EXIT_OK;
  }
  if (sub !== 'check' || file === undefined || rest.length > 0) {
    io.stderr(`reefd config: expected "check FILE" or "schema"\n\n${HELP}`);
    return EXIT_USAGE;
  }
  let result;
  try {
    result = await loadConfigFile(file);
  } catch (err) {
    io.stderr(`${file}: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  if (!result.ok) {
    for (const p of result.problems) io.stdout(`${formatProblem(p)}\n`);
    io.stderr(`${file}: ${result.problems.length} problem(s); the configuration is not valid\n`);
    return EXIT_USAGE;
  }
  const c = result.config;
  const sensors = Object.values(c.stations).reduce((n, s) => n + Object.keys(s.sensors).length, 0);
  io.stdout(
    `${file}: valid: site ${c.site}, ${Object.keys(c.stations).length} stations, ${sensors} sensors, ` +
      `${Object.keys(c.transects).length} transects\n`,
  );
  // Valid for a replay, but the daemon would receive nothing: say so now rather than at the first start.
  if (c.sources?.mqtt === undefined && c.sources?.kafka === undefined)
    io.stderr(
      `${file}: note: no sources: reefd run refuses this file (REEFD_NO_SOURCE); reefd replay accepts it. ` +
        'Add sources.mqtt or sources.kafka to run the daemon.\n',
    );
  return EXIT_OK;
};
