// `reefd alerts list --data DIR [--all] [--json]` and `reefd alerts ack ID --data DIR [--by NAME] [--comment TEXT]`:
// read and acknowledge alerts in the notifier's state files (DIR/alerts/outbox.jsonl and acks.jsonl). An ack is
// an fsynced append to acks.jsonl; a running daemon sees it within a second or two (its dashboard shows it) and
// stops reminding. The dashboard and its HTTP API write the same journal, so every path shows one state.
import { parseArgs } from 'node:util';
import { alertsStateDir, appendAck, loadOutboxState, type Episode } from '../../notifiers/index.js';
import { alertUnit } from '../../dashboard/alert-book.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd alerts list --data DIR [--all] [--json]
       reefd alerts ack ID --data DIR [--by NAME] [--comment TEXT]

list   shows the alerts raised and not yet cleared (--all: also the cleared ones kept in the state),
       with their acknowledgement and the messages still queued per channel.
ack    acknowledges a raised alert by its id (or a unique prefix of at least 4 characters): reminders
       for it stop, and the dashboard shows who acknowledged it and why. The clear is still notified
       when it comes. A cleared alert cannot be acknowledged.

Options:
  --data DIR      the daemon's data folder (required)
  --by NAME       who acknowledges (default: $USER; required when $USER is not set)
  --comment TEXT  what you saw or did (shown with the acknowledgement)
  --all           list cleared alerts too
  --json          print the list as JSON
`;

function describe(e: Episode): string {
  const a = e.raised ?? e.last;
  const where = a.sensor === undefined ? a.station : `${a.station}/${a.sensor}`;
  const what = a.metric ?? a.fault ?? '';
  const unit = alertUnit(a).unit;
  const value = a.value === null ? '' : ` value ${a.value}${unit && unit !== '1' ? ` ${unit}` : ''}`;
  const state = e.cleared ? `cleared ${e.last.t}` : 'raised';
  const said = e.ack?.comment !== undefined ? ` "${e.ack.comment}"` : '';
  const ack = e.ack ? ` acked by ${e.ack.by} ${new Date(e.ack.atMs).toISOString()}${said}` : '';
  return `${e.id}  ${a.t}  ${a.severity.padEnd(8)} ${a.rule} ${where} ${what}${value}  ${state}${ack}`;
}

function findEpisode(eps: Episode[], idArg: string, io: CliIo): Episode | null {
  const exact = eps.find((e) => e.id === idArg);
  if (exact) return exact;
  const matches = idArg.length >= 4 ? eps.filter((e) => e.id.startsWith(idArg)) : [];
  if (matches.length === 1) return matches[0] as Episode;
  io.stderr(
    matches.length > 1
      ? `reefd alerts ack: REEFD_NOTIFY_AMBIGUOUS_ID: "${idArg}" matches ${matches.length} alerts; give more of the id\n`
      : `reefd alerts ack: REEFD_NOTIFY_UNKNOWN_ALERT: no alert with id "${idArg}"; see "reefd alerts list --data DIR"\n`,
  );
  return null;
}

export const run: CommandRun = async (args, io) => {
  let parsed;
  try {
    parsed = parseArgs({
      args,
      allowPositionals: true,
      options: {
        data: { type: 'string' },
        by: { type: 'string' },
        comment: { type: 'string' },
        all: { type: 'boolean', default: false },
        json: { type: 'boolean', default: false },
        help: { type: 'boolean', short: 'h', default: false },
      },
    });
  } catch (err) {
    io.stderr(`reefd alerts: ${(err as Error).message}\n\n${HELP}`);
    return EXIT_USAGE;
  }
  const { values, positionals } = parsed;
  if (values.help) {
    io.stdout(HELP);
    return EXIT_OK;
  }
  const [sub, ...rest] = positionals;
  if ((sub !== 'list' && sub !== 'ack') || values.data === undefined) {
    io.stderr(
      `reefd alerts: ${values.data === undefined ? 'give --data DIR' : `unknown subcommand "${sub ?? ''}"`}\n\n${HELP}`,
    );
    return EXIT_USAGE;
  }
  const dir = alertsStateDir(values.data);
  let state;
  try {
    state = (await loadOutboxState(dir)).state;
  } catch (err) {
    io.stderr(`reefd alerts: cannot read ${dir} (${(err as Error).message}); check --data\n`);
    return EXIT_FAILURE;
  }
  const episodes = [...state.episodes.values()].sort((a, b) =>
    (a.raised ?? a.last).t < (b.raised ?? b.last).t ? -1 : 1,
  );

  if (sub === 'list') return list(state, episodes, values, io);
  return ack(dir, episodes, rest, values, io);
};

type OutboxState = Awaited<ReturnType<typeof loadOutboxState>>['state'];
interface AlertsValues {
  all?: boolean;
  json?: boolean;
  by?: string;
  comment?: string;
}

/** `list`: the raised alerts (all with --all), oldest first, and the notifications still queued per channel. */
function list(state: OutboxState, episodes: readonly Episode[], values: AlertsValues, io: CliIo): number {
  const shown = values.all ? episodes : episodes.filter((e) => !e.cleared);
  const pending: Record<string, number> = {};
  for (const it of state.items.values()) for (const c of it.pending) pending[c] = (pending[c] ?? 0) + 1;
  if (values.json) {
    io.stdout(JSON.stringify({ alerts: shown, queued: pending }, null, 2) + '\n');
    return EXIT_OK;
  }
  if (shown.length === 0) io.stdout(values.all ? 'no alerts\n' : 'no active alerts\n');
  for (const e of shown) io.stdout(describe(e) + '\n');
  const q = Object.entries(pending);
  if (q.length > 0) io.stdout(`queued: ${q.map(([c, n]) => `${c} ${n}`).join(', ')}\n`);
  return EXIT_OK;
}

/** `ack ID`: acknowledges a raised alert in the name of --by (or $USER). */
async function ack(
  dir: string,
  episodes: Episode[],
  rest: readonly string[],
  values: AlertsValues,
  io: CliIo,
): Promise<number> {
  if (rest.length !== 1) {
    io.stderr(`reefd alerts ack: give exactly one alert id\n\n${HELP}`);
    return EXIT_USAGE;
  }
  const ep = findEpisode(episodes, rest[0] as string, io);
  if (ep === null) return EXIT_FAILURE;
  if (ep.ack) {
    io.stdout(
      `${ep.id} was already acknowledged by ${ep.ack.by} at ${new Date(ep.ack.atMs).toISOString()}\n`,
    );
    return EXIT_OK;
  }
  if (ep.cleared) {
    io.stderr(
      `reefd alerts ack: REEFD_NOTIFY_ALERT_CLEARED: ${ep.id} cleared at ${ep.last.t}; only a raised alert can be acknowledged\n`,
    );
    return EXIT_FAILURE;
  }
  // An acknowledgement names a person: the page and the log show who took the alert on.
  const by = (values.by ?? io.env.USER ?? '').trim();
  if (by === '') {
    io.stderr('reefd alerts ack: say who acknowledges with --by NAME\n');
    return EXIT_USAGE;
  }
  const comment = values.comment?.trim();
  // The ack carries wall-clock time: it is an operator's action, not an event of the data.
  await appendAck(dir, { op: 'ack', id: ep.id, by, at: Date.now(), ...(comment ? { comment } : {}) });
  io.stdout(`acknowledged ${ep.id} (${(ep.raised ?? ep.last).rule} at ${ep.last.station}) by ${by}\n`);
  return EXIT_OK;
}
