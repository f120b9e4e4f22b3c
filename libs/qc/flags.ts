// U.S. IOOS QARTOD, "Manual for the Use of Real-Time Oceanographic Data Quality Control Flags" (2014-2020 eds.;
// from memory: verify current version): primary flags 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing.
// Aggregation rules are docs/methods/qc.md 7.4.

/** A QARTOD primary flag. */
export type QcFlag = 1 | 2 | 3 | 4 | 9;

export const FLAG_PASS = 1 as const;
export const FLAG_NOT_EVALUATED = 2 as const;
export const FLAG_SUSPECT = 3 as const;
export const FLAG_FAIL = 4 as const;
export const FLAG_MISSING = 9 as const;

/**
 * Sample flag from its test flags (docs/methods/qc.md 7.4): 9 if any test says missing; else the worst evaluated test
 * (1 < 3 < 4); 2 when no test was evaluated (empty list or only 2s).
 */
export function aggregateFlags(flags: readonly QcFlag[]): QcFlag {
  let worst: QcFlag = FLAG_NOT_EVALUATED;
  for (const f of flags) {
    if (f === FLAG_MISSING) return FLAG_MISSING;
    if (f === FLAG_NOT_EVALUATED) continue;
    if (worst === FLAG_NOT_EVALUATED || f > worst) worst = f;
  }
  return worst;
}

/**
 * Flag of a derived value from the flags of its required inputs (docs/methods/qc.md 7.4): 9 (not computed) if any input
 * is 4 or 9; otherwise the worst input flag on the order 1 < 2 < 3. Empty input gives 2.
 */
export function derivedFlag(inputFlags: readonly QcFlag[]): QcFlag {
  if (inputFlags.length === 0) return FLAG_NOT_EVALUATED;
  let worst: QcFlag = FLAG_PASS;
  for (const f of inputFlags) {
    if (f === FLAG_FAIL || f === FLAG_MISSING) return FLAG_MISSING;
    if (f > worst) worst = f;
  }
  return worst;
}

/** The worse of two flags on the sample order 1 < 2 < 3 < 4 < 9 (for raising a value by its own checks). */
export function worseFlag(a: QcFlag, b: QcFlag): QcFlag {
  return a >= b ? a : b;
}
