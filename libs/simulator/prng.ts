// Seeded pseudo-random numbers for the simulator: libs never use Math.random, so a seed fixes every output.
// Generator: mulberry32 (a 32-bit multiply-xorshift generator, public domain); seeds are mixed with the
// splitmix32 finaliser so that neighbouring seeds give unrelated streams. Not for cryptography.

/** A stream of uniform numbers in [0, 1) plus the normal deviates built from them. */
export interface Rng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal deviate (Box-Muller on two uniforms). */
  normal(): number;
  /** An independent child stream, fixed by this stream's seed and `label` (order-independent). */
  fork(label: string): Rng;
}

function mix32(x: number): number {
  let z = (x + 0x9e3779b9) | 0;
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

function hashLabel(label: string): number {
  // FNV-1a, 32 bit.
  let h = 0x811c9dc5;
  for (let i = 0; i < label.length; i++) {
    h ^= label.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/** Creates the stream for an integer seed; the same seed always gives the same numbers. */
export function createRng(seed: number): Rng {
  const base = mix32(Math.trunc(seed) >>> 0);
  let state = base;
  let spare: number | undefined;
  const next = (): number => {
    state = (state + 0x6d2b79f5) | 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    normal() {
      if (spare !== undefined) {
        const s = spare;
        spare = undefined;
        return s;
      }
      const u1 = Math.max(next(), 1e-300);
      const u2 = next();
      const r = Math.sqrt(-2 * Math.log(u1));
      spare = r * Math.sin(2 * Math.PI * u2);
      return r * Math.cos(2 * Math.PI * u2);
    },
    fork(label: string) {
      return createRng(mix32(base ^ hashLabel(label)));
    },
  };
}
