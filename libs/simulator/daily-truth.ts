// The truth of the daily budgets (docs/methods/daily.md 10.7): the simulator's own community rates integrated
// over each local day, per transect, at the model step. Night is surface PAR below 1 umol m-2 s-1, the
// darkness the daily budget uses. Only days the run covers from their first to their last step are given.
import type { TransectConfig } from '../contract/index.js';
import { createLocalCalendar, type LocalCalendar, type LocalDayBounds } from '../daily/index.js';
import type { ReefSnapshot } from './model.js';
import type { SiteLayout } from './site.js';

export interface DailyTruth {
  kind: 'daily';
  /** Start of the local day, ISO UTC. */
  t: string;
  day: string;
  transect: string;
  hours: number;
  ncp_mmol_m2_d: number;
  r_mmol_m2_d: number;
  gpp_mmol_m2_d: number;
  nec_mmol_m2_d: number;
  nec_day_mmol_m2_d: number;
  nec_night_mmol_m2_d: number;
}

const DARK_PAR_UMOL_M2_S = 1;
const r3 = (x: number) => Math.round(x * 1000) / 1000;

interface Sums {
  ncp: number;
  r: number;
  gpp: number;
  necDay: number;
  necNight: number;
}

export class DailyTruthAccumulator {
  readonly #calendar: LocalCalendar;
  readonly #stepH: number;
  readonly #transects: { id: string; inner: boolean }[];
  #day: LocalDayBounds | undefined;
  #complete = false;
  #sums = new Map<string, Sums>();

  constructor(
    transects: Record<string, TransectConfig>,
    layout: SiteLayout,
    timeZone: string,
    stepS: number,
  ) {
    this.#calendar = createLocalCalendar(timeZone);
    this.#stepH = stepS / 3600;
    this.#transects = Object.entries(transects).map(([id, tr]) => ({
      id,
      // The same choice of segment as transectTruth: flat -> back reef is the inner segment.
      inner: layout.roleOf.get(tr.upstream) === 'flat' && layout.roleOf.get(tr.downstream) === 'back',
    }));
  }

  /** Adds one model step (its rates held for stepS from snap.tMs); returns the rows of a day just completed. */
  add(snap: ReefSnapshot): DailyTruth[] {
    const out: DailyTruth[] = [];
    if (this.#day === undefined || snap.tMs >= this.#day.endMs) {
      if (this.#day !== undefined && this.#complete) out.push(...this.#rows(this.#day));
      this.#day = this.#calendar.dayOf(snap.tMs);
      this.#complete = snap.tMs === this.#day.startMs;
      this.#sums.clear();
    }
    const night = snap.parUmolM2S < DARK_PAR_UMOL_M2_S;
    for (const tr of this.#transects) {
      const m = tr.inner ? snap.inner : snap.outer;
      let s = this.#sums.get(tr.id);
      if (s === undefined) this.#sums.set(tr.id, (s = { ncp: 0, r: 0, gpp: 0, necDay: 0, necNight: 0 }));
      s.ncp += m.ncpMmolM2H * this.#stepH;
      s.r += m.respMmolM2H * this.#stepH;
      s.gpp += m.gppMmolM2H * this.#stepH;
      if (night) s.necNight += m.necMmolM2H * this.#stepH;
      else s.necDay += m.necMmolM2H * this.#stepH;
    }
    return out;
  }

  /** Rows of the last day if the run ended exactly at its end (call once, with the run's end). */
  finish(endMs: number): DailyTruth[] {
    return this.#day !== undefined && this.#complete && endMs === this.#day.endMs
      ? this.#rows(this.#day)
      : [];
  }

  #rows(b: LocalDayBounds): DailyTruth[] {
    return this.#transects.map(({ id }) => {
      const s = this.#sums.get(id) as Sums;
      return {
        kind: 'daily',
        t: new Date(b.startMs).toISOString(),
        day: b.day,
        transect: id,
        hours: b.hours,
        ncp_mmol_m2_d: r3(s.ncp),
        r_mmol_m2_d: r3(s.r),
        gpp_mmol_m2_d: r3(s.gpp),
        nec_mmol_m2_d: r3(s.necDay + s.necNight),
        nec_day_mmol_m2_d: r3(s.necDay),
        nec_night_mmol_m2_d: r3(s.necNight),
      };
    });
  }
}
