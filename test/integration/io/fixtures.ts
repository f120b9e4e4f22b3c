// Fictional derived records for the sink tests: one oxygen series per station, one record a minute.
import pino from 'pino';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import type { Logger } from '../../../services/log/logger.js';

/** A fixed start time a few days back (VictoriaMetrics refuses points too far in the future). */
export const T0_MS = Date.UTC(2026, 10, 20, 0, 0, 0);

export function oxygenRecords(
  n: number,
  opts: { site: string; station?: string; fromIndex?: number },
): DerivedRecord[] {
  const from = opts.fromIndex ?? 0;
  return Array.from({ length: n }, (_, k) => {
    const i = from + k;
    return {
      type: 'oxygen',
      site: opts.site,
      station: opts.station ?? 'crest',
      t: new Date(T0_MS + i * 60_000).toISOString(),
      o2_umol_kg: 200 + i / 1000,
      o2_sat_pct: 95.5,
      o2_mg_l: i % 2 === 0 ? 6.5 : null,
    };
  });
}

/** The index a test record was made with, from its oxygen value. */
export function indexOf(o2UmolKg: number): number {
  return Math.round((o2UmolKg - 200) * 1000);
}

export function quietLogger(): Logger {
  return pino({ level: process.env.REEFD_TEST_LOG ?? 'silent' });
}
