// The site's dead-man in the live daemon: the pure state machine of libs/alerts (silence.ts: `site_silent`,
// class fault, fault `silent`, after alerts.silence_min of wall-clock time without an accepted message,
// cleared by the next one) driven by a timer and fed by the pipeline. Only the live daemon runs it, so a
// replay never raises it. Its state goes into the checkpoint: a silence raised before a restart is cleared
// by the first message after it; one not raised counts from the restart, not from before the stop.
// The alert goes where any alert goes: the record bus (dashboard, notifier) and the record outputs. It has
// no stream position (no archive line derives it), so each output writes it as it comes and is flushed at
// once: a crash cannot cut it off as an uncommitted tail.
import {
  createSiteSilence,
  resolveRules,
  silenceCheck,
  silenceNextCheckMs,
  silenceOnMessage,
  type AlertRecord,
  type SiteSilenceState,
} from '../../libs/alerts/index.js';
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { RecordSink } from '../pipeline/types.js';
import type { StartContext } from './context.js';
import { errFields } from '../log/logger.js';

export interface SilenceWatch {
  /** A message of the site was accepted (received, valid, archived) at wall time `rxMs`. */
  accepted(rxMs: number): void;
  /** The state for the checkpoint (plain JSON). */
  snapshot(): SiteSilenceState;
}

/** Step: the dead-man, between the outputs (it writes to them) and the pipeline (which feeds it). */
export function buildSilenceWatch(
  ctx: StartContext,
  sinks: readonly RecordSink[],
  saved: SiteSilenceState | undefined,
): SilenceWatch {
  const { config } = ctx;
  const logger = ctx.logger.child({ component: 'silence' });
  const cfg = resolveRules(config.alerts).silence;
  const now = ctx.clock();
  const st: SiteSilenceState =
    saved !== undefined && saved.site === config.site
      ? { ...saved, lastMs: saved.raisedAtMs === null ? Math.max(saved.lastMs, now) : saved.lastMs }
      : createSiteSilence(config.site, now);
  let timer: NodeJS.Timeout | undefined;

  const emit = (alerts: readonly AlertRecord[]): void => {
    if (alerts.length === 0) return;
    // The alert engine's records are contract `alert` records (with `id` and `severity` of our own).
    const records = alerts.map((a) => ({ ...a }) as DerivedRecord);
    for (const r of records)
      logger.warn(
        { rule: r.type === 'alert' ? r.rule : undefined, state: r.type === 'alert' ? r.state : undefined },
        r.type === 'alert' && r.state === 'raised' ? 'no message from the site' : 'the site speaks again',
      );
    for (const s of sinks) {
      s.write(records);
      s.flush().catch((err: unknown) => logger.error({ ...errFields(err), sink: s.name }, 'flush failed'));
    }
    ctx.bus.publish(records);
  };

  const schedule = (): void => {
    if (timer !== undefined) clearTimeout(timer);
    timer = undefined;
    const at = silenceNextCheckMs(st, cfg);
    if (at === null) return;
    timer = setTimeout(
      () => {
        timer = undefined;
        emit(silenceCheck(st, cfg, ctx.clock()));
        schedule();
      },
      Math.max(0, at - ctx.clock()),
    );
    timer.unref();
  };
  schedule();
  ctx.life.add('silence watch', st, () => {
    if (timer !== undefined) clearTimeout(timer);
    timer = undefined;
  });

  return {
    accepted(rxMs) {
      const was = st.raisedAtMs;
      emit(silenceOnMessage(st, cfg, rxMs));
      // While not raised the timer is left where it is: firing early it finds no silence and re-arms at the
      // new limit (no timer work per message). After a clear there is no timer: arm one.
      if (was !== null) schedule();
    },
    snapshot: () => ({ ...st }),
  };
}
