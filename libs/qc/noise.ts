// The sensor's own measured noise and resolution (docs/methods/faults.md 12.1), learned from its recent samples:
// - the typical step |V_n - V_{n-1}| and the typical second difference |V_n - 2 V_{n-1} + V_{n-2}| as running means
//   over about `windowSamples` samples, each sample clipped at 5 x the running mean (Huber-style) so a spike or a
//   step moves the estimate little;
// - the resolution from the decimals the sensor reports (a pCO2 of 405.3 uatm has 0.1 uatm resolution);
// - how often two successive readings are bit-identical, counted once each run of repeats has ended, and never from
//   a run that was judged frozen (a frozen stretch must not teach the test that repeats are normal).
// Gaussian equivalents (common practice): for a normal variable x of sd s, E|x| = s sqrt(2/pi), so s = E|x| sqrt(pi/2).
// Plain JSON data (null for "none yet").

/** Settings of the noise profile (docs/methods/faults.md 12.1). */
export interface NoiseLimits {
  /** Effective memory of the running means, samples (default 144: a day of 10-min samples). */
  readonly windowSamples: number;
  /** Fewest differences before the profile is used (default 12). */
  readonly minSamples: number;
}

export const DEFAULT_NOISE_LIMITS: NoiseLimits = Object.freeze({ windowSamples: 144, minSamples: 12 });

export interface NoiseProfile {
  /** Last two usable values (V_{n-1}, V_{n-2}) without a gap between them and now; null after a gap. */
  v1: number | null;
  v2: number | null;
  /** Running mean |first difference| and how many differences fed it (capped at windowSamples). */
  d1: number;
  n1: number;
  /** Running mean |second difference| and its count. */
  d2: number;
  n2: number;
  /** Most decimals seen in a value (resolution 10^-decimals), 0-12. */
  decimals: number;
  /** Pairs of successive readings judged, and how many of them were bit-identical (decayed to ~2 x window). */
  pairs: number;
  repeats: number;
}

export const newNoiseProfile = (): NoiseProfile => ({
  v1: null,
  v2: null,
  d1: 0,
  n1: 0,
  d2: 0,
  n2: 0,
  decimals: 0,
  pairs: 0,
  repeats: 0,
});

const SQRT_HALF_PI = Math.sqrt(Math.PI / 2);
const CLIP = 5;

function runningMean(mean: number, n: number, x: number, cap: number): [number, number] {
  // No clip while the mean is 0 (a sensor that has not moved yet): it could never learn otherwise.
  const clipped = n >= 8 && mean > 0 ? Math.min(x, CLIP * mean) : x;
  const m = Math.min(n + 1, cap);
  return [mean + (clipped - mean) / m, m];
}

/** Decimals of a finite value, 0-12 (e.g. 405.3 -> 1, 26.1234 -> 4). */
export function decimalsOf(v: number): number {
  for (let d = 0; d < 12; d++) {
    const x = v * 10 ** d;
    if (Math.abs(x - Math.round(x)) <= 1e-9 * Math.max(1, Math.abs(x))) return d;
  }
  return 12;
}

/**
 * Feeds one usable value. `contiguous` is false after a gap or an unusable sample: the differences restart.
 */
export function noiseAdd(p: NoiseProfile, v: number, contiguous: boolean, lim: NoiseLimits): void {
  if (p.decimals < 12) {
    const x = v * 10 ** p.decimals;
    if (Math.abs(x - Math.round(x)) > 1e-9 * Math.max(1, Math.abs(x))) p.decimals = decimalsOf(v);
  }
  if (!contiguous) {
    p.v1 = v;
    p.v2 = null;
    return;
  }
  if (p.v1 !== null) {
    [p.d1, p.n1] = runningMean(p.d1, p.n1, Math.abs(v - p.v1), lim.windowSamples);
    if (p.v2 !== null) {
      [p.d2, p.n2] = runningMean(p.d2, p.n2, Math.abs(v - 2 * p.v1 + p.v2), lim.windowSamples);
    }
  }
  p.v2 = p.v1;
  p.v1 = v;
}

/**
 * Adds a finished run of `length` identical readings: length - 1 repeats, then one change when `ended` (a run cut
 * by a gap shows no change).
 */
export function noiseAddRun(p: NoiseProfile, length: number, lim: NoiseLimits, ended = true): void {
  p.pairs += ended ? length : length - 1;
  p.repeats += length - 1;
  const cap = 2 * lim.windowSamples;
  if (p.pairs > cap) {
    p.repeats *= cap / p.pairs;
    p.pairs = cap;
  }
}

/** The profile's scales; null members until enough samples were seen. */
export interface NoiseScales {
  /** Gaussian-equivalent sd of the step V_n - V_{n-1} (variable's unit), or null. */
  stepSd: number | null;
  /** Gaussian-equivalent sd of the spike statistic |V_n - (V_{n-1} + V_{n+1})/2| (half a second difference). */
  spikeSd: number | null;
  /** Resolution, 10^-decimals (variable's unit). */
  resolution: number;
  /**
   * Chance that a reading repeats the previous one bit for bit on healthy data: the larger of the counted rate
   * (repeats + 0.5)/(pairs + 1) and the rate the noise implies at this resolution, q / (sqrt(2 pi) stepSd)
   * (two readings whose difference is normal with sd stepSd round to the same value of step q). Null until
   * `minSamples` pairs were counted.
   */
  repeatP: number | null;
}

export function noiseScales(p: NoiseProfile, lim: NoiseLimits): NoiseScales {
  const resolution = 10 ** -p.decimals;
  const stepSd = p.n1 >= lim.minSamples ? p.d1 * SQRT_HALF_PI : null;
  const spikeSd = p.n2 >= lim.minSamples ? 0.5 * p.d2 * SQRT_HALF_PI : null;
  let repeatP: number | null = null;
  if (p.pairs >= lim.minSamples) {
    const counted = (p.repeats + 0.5) / (p.pairs + 1);
    const implied =
      stepSd === null ? 1 : stepSd > 0 ? Math.min(1, resolution / (Math.sqrt(2 * Math.PI) * stepSd)) : 1;
    repeatP = Math.max(counted, implied);
  }
  return { stepSd, spikeSd, resolution, repeatP };
}
