// The day's cadence slots (docs/methods/daily.md 10.4): the local day is cut into slots of one processing
// cadence; each flux window belongs to the slot that holds its centre, so overlapping windows (30 min every
// 10 min) are each counted once, for one cadence of time. PAR is carried to slots without it by linear
// interpolation over short gaps, or set to darkness where the sun is down.
import { isSunDown } from './sun.js';

/** One flux window as the daily budget needs it (a `flux` record plus the window's PAR). */
export interface FluxWindowInput {
  /** Window centre (the flux record's `t`), ms. */
  tMs: number;
  /** The record's `valid`. */
  valid: boolean;
  ncpMmolM2H: number | null;
  ncpSigmaMmolM2H: number | null;
  necMmolM2H: number | null;
  necSigmaMmolM2H: number | null;
  /** Window-mean PAR (surface, or at the bed where the processor has an attenuation), umol m-2 s-1. */
  parUmolM2S: number | null;
  /** Window-mean aragonite saturation of the transect (optional; for the NEC-Omega fit). */
  omegaAr?: number | null;
}

export interface Slot {
  /** Slot centre, ms. */
  tMs: number;
  ncp: number | null;
  ncpSigma: number | null;
  nec: number | null;
  necSigma: number | null;
  par: number | null;
  omega: number | null;
  /** PAR came from interpolation or from the sun rather than from this slot's windows. */
  parFilled: boolean;
}

export interface SlotOptions {
  cadenceMin: number;
  /** Longest stretch (minutes) bridged by linear interpolation of PAR (default 60). */
  maxInterpMin?: number;
  /** Site position, for darkness where PAR is missing. */
  sun?: { latDeg: number; lonDeg: number };
}

const usable = (x: number | null | undefined, s?: number | null | undefined): x is number =>
  x !== null && x !== undefined && Number.isFinite(x) && (s === undefined || (s !== null && s > 0));

function meanOf(xs: number[]): number | null {
  return xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null;
}

/** Cuts [startMs, endMs) into cadence slots and places the windows in them (several windows in one slot
 * are averaged; invalid windows give only their PAR). */
export function buildSlots(
  startMs: number,
  endMs: number,
  windows: readonly FluxWindowInput[],
  o: SlotOptions,
): Slot[] {
  const step = o.cadenceMin * 60_000;
  const n = Math.round((endMs - startMs) / step);
  const bins = Array.from({ length: n }, () => ({
    ncp: [] as number[],
    ncpS: [] as number[],
    nec: [] as number[],
    necS: [] as number[],
    par: [] as number[],
    om: [] as number[],
  }));
  for (const w of windows) {
    const k = Math.floor((w.tMs - startMs) / step);
    const b = bins[k];
    if (k < 0 || k >= n || b === undefined) continue;
    if (usable(w.parUmolM2S)) b.par.push(Math.max(0, w.parUmolM2S));
    if (!w.valid) continue;
    if (usable(w.ncpMmolM2H, w.ncpSigmaMmolM2H)) {
      b.ncp.push(w.ncpMmolM2H);
      b.ncpS.push(w.ncpSigmaMmolM2H as number);
    }
    if (usable(w.necMmolM2H, w.necSigmaMmolM2H)) {
      b.nec.push(w.necMmolM2H);
      b.necS.push(w.necSigmaMmolM2H as number);
    }
    if (usable(w.omegaAr)) b.om.push(w.omegaAr);
  }
  // Several windows in one slot: their mean, with the sigma of one (they share most samples).
  const slots: Slot[] = bins.map((b, k) => ({
    tMs: startMs + (k + 0.5) * step,
    ncp: meanOf(b.ncp),
    ncpSigma: meanOf(b.ncpS),
    nec: meanOf(b.nec),
    necSigma: meanOf(b.necS),
    par: meanOf(b.par),
    omega: meanOf(b.om),
    parFilled: false,
  }));
  fillPar(slots, step, o);
  return slots;
}

function fillPar(slots: Slot[], step: number, o: SlotOptions): void {
  const maxGap = (o.maxInterpMin ?? 60) * 60_000;
  const known = slots.flatMap((s, i) => (s.par !== null && !s.parFilled ? [i] : []));
  let j = 0;
  for (let i = 0; i < slots.length; i++) {
    const s = slots[i] as Slot;
    if (s.par !== null) continue;
    while (j < known.length && (known[j] as number) < i) j++;
    const right = known[j];
    const left = j > 0 ? known[j - 1] : undefined;
    if (left !== undefined && right !== undefined && (right - left) * step <= maxGap + step) {
      const a = slots[left] as Slot;
      const b = slots[right] as Slot;
      const f = (i - left) / (right - left);
      s.par = (a.par as number) + f * ((b.par as number) - (a.par as number));
      s.parFilled = true;
    } else if (o.sun && isSunDown(s.tMs, o.sun.latDeg, o.sun.lonDeg)) {
      s.par = 0;
      s.parFilled = true;
    }
  }
}
