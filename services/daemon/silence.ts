// The site's dead-man (docs/contract-v1.md, alerts; docs/methods/alerts.md 8): when no message of the site
// has been accepted for `alerts.silence_min` minutes of wall-clock time, the live daemon raises a
// `site_silent` alert (class fault, fault `silent`); the next accepted message clears it. Every other alert
// runs on event time and so can only move when messages arrive; this one is the only rule on the wall
// clock, which is why it lives here and not in libs/alerts, and why a replay never raises it.
// The alert goes where any alert goes: the record bus (dashboard, notifier) and the record outputs. It has
// no stream position (no archive line derives it), so each output writes it as it comes and is flushed at
// once: a crash cannot cut it off as an uncommitted tail.
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { RecordSink } from '../pipeline/types.js';
import type { StartContext } from './context.js';

export interface SilenceWatch {
  /** A message of the site was accepted (received, valid, archived) at `rxMs`. */
  accepted(rxMs: number): void;
  /** True while the alert is raised. */
  raised(): boolean;
}

export interface SilenceOptions {
  /** How often the clock is looked at (default 1 s: the alert comes within a second of the limit). */
  tickMs?: number | undefined;
}

/** Step: the dead-man, between the outputs (it writes to them) and the pipeline (which feeds it). */
export function buildSilenceWatch(
  ctx: StartContext,
  sinks: readonly RecordSink[],
  o: SilenceOptions = {},
): SilenceWatch {
  const { config, logger } = ctx;
  const limitMin = config.alerts.silence_min;
  const limitMs = limitMin * 60_000;
  // Silence is counted from the start: a site that never speaks after a restart is silent too.
  let lastMs = ctx.clock();
  let raisedAtMs: number | undefined;

  const emit = (state: 'raised' | 'cleared', nowMs: number, at: number): void => {
    const record = {
      type: 'alert',
      site: config.site,
      t: new Date(nowMs).toISOString(),
      rule: 'site_silent',
      class: 'fault',
      fault: 'silent',
      state,
      value: Math.round(((nowMs - lastMs) / 60_000) * 10) / 10,
      limit: limitMin,
      severity: 'critical',
      id: `site_silent.${config.site}.${at}`,
    } as DerivedRecord;
    logger.warn(
      { rule: 'site_silent', state, silentMin: record.value, limitMin },
      state === 'raised' ? 'no message from the site' : 'the site speaks again',
    );
    for (const s of sinks) s.write([record]);
    for (const s of sinks)
      s.flush().catch((err: unknown) => logger.error({ err, sink: s.name }, 'flush failed'));
    ctx.bus.publish([record]);
  };

  const timer = setInterval(() => {
    const now = ctx.clock();
    if (raisedAtMs === undefined && now - lastMs >= limitMs) {
      raisedAtMs = now;
      emit('raised', now, now);
    }
  }, o.tickMs ?? 1000);
  timer.unref();
  ctx.life.add('silence watch', timer, (t) => clearInterval(t));

  return {
    accepted(rxMs) {
      if (raisedAtMs !== undefined) {
        const at = raisedAtMs;
        raisedAtMs = undefined;
        emit('cleared', Math.max(rxMs, ctx.clock()), at);
      }
      if (rxMs > lastMs) lastMs = rxMs;
    },
    raised: () => raisedAtMs !== undefined,
  };
}
