// The storage term of the O2 budget (docs/methods/metabolism.md 6.1): dCm/dt of the transect mean
// Cm = (C_A + C_B)/2 between window means. Backward, (Cm_k - Cm_k-1)/dt, when the window is computed as soon as
// it closes; centred, (Cm_k+1 - Cm_k-1)/(2 dt), when the next window is known too. The backward difference
// estimates the rate half a window earlier than the window's centre, an error of about (dt/2) d2C/dt2 that is
// largest where the concentration turns (dawn and dusk); the centred one is second-order accurate there
// (error (dt^2/6) d3C/dt3; common practice for finite differences). The random sigma comes from the standard
// errors of the means (docs/methods/uncertainty.md 9.2).
import { storageRate } from './budget.js';
import type { StationWindowMean } from './types.js';

export interface StorageTerm {
  /** dCm/dt [umol kg-1 s-1]; 0 without a previous window. */
  rate: number;
  /** Its random standard uncertainty [umol kg-1 s-1]. */
  sigma: number;
  /** Which difference gave it. */
  form: 'none' | 'backward' | 'centred';
}

type Pair = { up: StationWindowMean; down: StationWindowMean };

const sem = (p: Pair): number => 0.5 * Math.hypot(p.up.semO2UmolKg ?? 0, p.down.semO2UmolKg ?? 0);

/**
 * The O2 storage term of window `now`, with the previous window `prev` dtPrevS before it and, when given, the
 * next window `next` dtNextS after it (centred form).
 */
export function o2Storage(
  now: Pair,
  prev: Pair | undefined,
  dtPrevS: number,
  next?: { pair: Pair; dtS: number },
): StorageTerm {
  if (prev === undefined) return { rate: 0, sigma: 0, form: 'none' };
  if (next !== undefined) {
    const span = dtPrevS + next.dtS;
    return {
      rate: storageRate(
        next.pair.up.o2UmolKg,
        next.pair.down.o2UmolKg,
        prev.up.o2UmolKg,
        prev.down.o2UmolKg,
        span,
      ),
      sigma: Math.hypot(sem(next.pair), sem(prev)) / span,
      form: 'centred',
    };
  }
  return {
    rate: storageRate(now.up.o2UmolKg, now.down.o2UmolKg, prev.up.o2UmolKg, prev.down.o2UmolKg, dtPrevS),
    sigma: Math.hypot(sem(now), sem(prev)) / dtPrevS,
    form: 'backward',
  };
}
