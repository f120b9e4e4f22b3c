// Station block means over windows W aligned to UTC multiples of W (docs/methods/conventions.md 1.5, time base): a mean uses the
// samples flagged 1-3, needs >= 50 % of the expected samples (else flag 9), and inherits the worst included flag.
// QARTOD flags: 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing.

export interface WindowBounds {
  startMs: number;
  endMs: number;
  centreMs: number;
}

/** The window [start, end) of length windowMin minutes, aligned to UTC multiples, that ends at or before endMs. */
export function windowEndingAt(endMs: number, windowMin: number): WindowBounds {
  const w = windowMin * 60_000;
  const end = Math.floor(endMs / w) * w;
  return { startMs: end - w, endMs: end, centreMs: end - w / 2 };
}

/**
 * Windows of length windowMin ending on the cadence grid (every cadenceMin minutes, UTC-aligned) inside
 * [fromMs, toMs]. With the defaults (30 min windows every 10 min) successive windows overlap by 20 min.
 */
export function windowSchedule(
  fromMs: number,
  toMs: number,
  windowMin: number,
  cadenceMin: number,
): WindowBounds[] {
  const w = windowMin * 60_000;
  const c = cadenceMin * 60_000;
  const out: WindowBounds[] = [];
  for (let end = Math.ceil((fromMs + w) / c) * c; end <= toMs; end += c) {
    out.push({ startMs: end - w, endMs: end, centreMs: end - w / 2 });
  }
  return out;
}

export interface WindowMeanResult {
  /** Mean of the included samples, or null when fewer than half the expected samples are usable. */
  mean: number | null;
  /** Random standard error of the mean: sd / sqrt(n) (0 for n = 1). */
  sem: number;
  n: number;
  flag: 1 | 2 | 3 | 4 | 9;
}

/**
 * Block mean of the samples with startMs <= t < endMs and flag 1-3. expectedCount is the number of samples the
 * sensor's interval gives over the window. Check: 6 of 10 expected samples, flags 1 and 3, gives their mean and
 * flag 3; 4 of 10 gives null and flag 9 (definition).
 */
export function windowMean(
  timesMs: ArrayLike<number>,
  values: ArrayLike<number>,
  flags: ArrayLike<number>,
  startMs: number,
  endMs: number,
  expectedCount: number,
): WindowMeanResult {
  let n = 0;
  let sum = 0;
  let worst = 1;
  for (let i = 0; i < timesMs.length; i++) {
    const t = timesMs[i] as number;
    if (t < startMs || t >= endMs) continue;
    const f = flags[i] as number;
    const v = values[i] as number;
    if (f < 1 || f > 3 || !Number.isFinite(v)) continue;
    n++;
    sum += v;
    if (f > worst) worst = f;
  }
  if (n === 0 || n < 0.5 * expectedCount) return { mean: null, sem: 0, n, flag: 9 };
  const mean = sum / n;
  let ss = 0;
  for (let i = 0; i < timesMs.length; i++) {
    const t = timesMs[i] as number;
    const f = flags[i] as number;
    const v = values[i] as number;
    if (t < startMs || t >= endMs || f < 1 || f > 3 || !Number.isFinite(v)) continue;
    ss += (v - mean) ** 2;
  }
  const sem = n > 1 ? Math.sqrt(ss / (n - 1) / n) : 0;
  return { mean, sem, n, flag: worst as 1 | 2 | 3 };
}
