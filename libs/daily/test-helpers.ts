// Seeded random numbers for the daily and forecast tests (no Math.random: runs must repeat exactly).
/** Uniform [0, 1) from a 32-bit LCG (Numerical Recipes constants) and normal deviates by Box-Muller. */
export function seeded(seed: number): { uniform(): number; normal(): number } {
  let s = seed >>> 0;
  const uniform = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
  return {
    uniform,
    normal: () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform()),
  };
}

export const mean = (xs: readonly number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
export const sd = (xs: readonly number[]) => {
  const m = mean(xs);
  return Math.sqrt(xs.reduce((a, b) => a + (b - m) ** 2, 0) / (xs.length - 1));
};
