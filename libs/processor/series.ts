// A bounded, time-ordered series of (t, value, flag): the processor's memory of one variable.
// Plain arrays so the whole processor state serialises to JSON for the checkpoint.

export interface Series {
  t: number[];
  v: number[];
  f: number[];
}

export function createSeries(): Series {
  return { t: [], v: [], f: [] };
}

/** Index of the first sample with t >= tMs (binary search). */
export function lowerBound(s: Series, tMs: number): number {
  let lo = 0;
  let hi = s.t.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((s.t[mid] as number) < tMs) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Inserts in time order (late samples go to their place). A sample at a time already present replaces it,
 * so a re-sent reading cannot count twice.
 */
export function insert(s: Series, tMs: number, value: number, flag: number): void {
  const n = s.t.length;
  if (n === 0 || tMs > (s.t[n - 1] as number)) {
    s.t.push(tMs);
    s.v.push(value);
    s.f.push(flag);
    return;
  }
  const i = lowerBound(s, tMs);
  if (s.t[i] === tMs) {
    s.v[i] = value;
    s.f[i] = flag;
    return;
  }
  s.t.splice(i, 0, tMs);
  s.v.splice(i, 0, value);
  s.f.splice(i, 0, flag);
}

/** Drops samples older than tMs (keeps memory bounded in time). */
export function pruneBefore(s: Series, tMs: number): void {
  const i = lowerBound(s, tMs);
  if (i > 0) {
    s.t.splice(0, i);
    s.v.splice(0, i);
    s.f.splice(0, i);
  }
}

/** Keeps at most maxSamples (the newest): a bound in count for sensors that report too fast. */
export function capCount(s: Series, maxSamples: number): void {
  const extra = s.t.length - maxSamples;
  if (extra > 0) {
    s.t.splice(0, extra);
    s.v.splice(0, extra);
    s.f.splice(0, extra);
  }
}

export interface Pick {
  tMs: number;
  value: number;
  flag: number;
}

/** The usable sample (flag 1-3) nearest to tMs within maxDistMs, or undefined. Ties go to the earlier one. */
export function nearest(s: Series, tMs: number, maxDistMs: number, asOfMs = Infinity): Pick | undefined {
  const i = lowerBound(s, tMs);
  let best: Pick | undefined;
  let bestD = Infinity;
  for (let j = i - 1; j >= 0; j--) {
    const d = tMs - (s.t[j] as number);
    if (d > maxDistMs || d >= bestD) break;
    if ((s.t[j] as number) > asOfMs) continue;
    if (usable(s.f[j] as number)) {
      best = { tMs: s.t[j] as number, value: s.v[j] as number, flag: s.f[j] as number };
      bestD = d;
      break;
    }
  }
  for (let j = i; j < s.t.length; j++) {
    const d = (s.t[j] as number) - tMs;
    if (d > maxDistMs || d >= bestD || (s.t[j] as number) > asOfMs) break;
    if (usable(s.f[j] as number)) {
      best = { tMs: s.t[j] as number, value: s.v[j] as number, flag: s.f[j] as number };
      break;
    }
  }
  return best;
}

/**
 * Mean of the usable samples within +-halfWidthMs of tMs, when any; else the nearest within maxDistMs
 * (docs/methods/conventions.md 1.5: CTD values are averaged over a short window around the reading, default +-5 min).
 */
export function localMean(
  s: Series,
  tMs: number,
  halfWidthMs: number,
  maxDistMs: number,
  asOfMs = Infinity,
): Pick | undefined {
  const upTo = Math.min(tMs + halfWidthMs, asOfMs);
  if (halfWidthMs > 0) {
    let n = 0;
    let sum = 0;
    let worst = 1;
    for (let j = lowerBound(s, tMs - halfWidthMs); j < s.t.length && (s.t[j] as number) <= upTo; j++) {
      const f = s.f[j] as number;
      if (!usable(f)) continue;
      n++;
      sum += s.v[j] as number;
      if (f > worst) worst = f;
    }
    if (n > 0) return { tMs, value: sum / n, flag: worst };
  }
  return nearest(s, tMs, maxDistMs, asOfMs);
}

/** Linear interpolation between the usable samples around tMs, each within maxGapMs; else nearest. */
export function interpolate(s: Series, tMs: number, maxGapMs: number, asOfMs = Infinity): Pick | undefined {
  const i = lowerBound(s, tMs);
  let a = i - 1;
  while (a >= 0 && (!usable(s.f[a] as number) || (s.t[a] as number) > asOfMs)) a--;
  let b = i;
  while (b < s.t.length && !usable(s.f[b] as number)) b++;
  if (b < s.t.length && (s.t[b] as number) > asOfMs) b = s.t.length;
  const ta = a >= 0 ? (s.t[a] as number) : -Infinity;
  const tb = b < s.t.length ? (s.t[b] as number) : Infinity;
  const okA = tMs - ta <= maxGapMs;
  const okB = tb - tMs <= maxGapMs;
  if (okA && okB && tb > ta) {
    const w = (tMs - ta) / (tb - ta);
    const value = (s.v[a] as number) * (1 - w) + (s.v[b] as number) * w;
    return { tMs, value, flag: Math.max(s.f[a] as number, s.f[b] as number) };
  }
  if (okA && tb === ta) return { tMs, value: s.v[a] as number, flag: s.f[a] as number };
  if (okA) return { tMs: ta, value: s.v[a] as number, flag: s.f[a] as number };
  if (okB) return { tMs: tb, value: s.v[b] as number, flag: s.f[b] as number };
  return undefined;
}

/**
 * Median spacing of the last samples before `beforeMs` (ms), the sensor's observed interval; undefined with
 * < 3 samples. Bounded by a time so a window's expected count depends only on the samples up to its end.
 */
export function medianIntervalMs(s: Series, lastN = 15, beforeMs = Infinity): number | undefined {
  const n = beforeMs === Infinity ? s.t.length : lowerBound(s, beforeMs);
  if (n < 3) return undefined;
  const d: number[] = [];
  for (let i = Math.max(1, n - lastN); i < n; i++) d.push((s.t[i] as number) - (s.t[i - 1] as number));
  d.sort((x, y) => x - y);
  return d[d.length >> 1];
}

function usable(flag: number): boolean {
  return flag >= 1 && flag <= 3;
}
