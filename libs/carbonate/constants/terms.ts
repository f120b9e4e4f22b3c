// Shared terms of the temperature-salinity fits, computed once per (S, T) so that the assembly of all
// constants evaluates each logarithm and square root a single time (hot path of the station pipeline).

export interface FitTerms {
  /** Practical salinity. */
  salinity: number;
  /** sqrt(S). */
  sqrtS: number;
  /** Temperature, K. */
  tempK: number;
  /** ln(T / K). */
  lnT: number;
}

/** FitTerms for practical salinity S and temperature T in kelvin. */
export function fitTerms(salinity: number, tempK: number): FitTerms {
  return { salinity, sqrtS: Math.sqrt(salinity), tempK, lnT: Math.log(tempK) };
}

/** Fills `out` in place (allocation-free form of fitTerms). */
export function fitTermsInto(out: FitTerms, salinity: number, tempK: number): FitTerms {
  out.salinity = salinity;
  out.sqrtS = Math.sqrt(salinity);
  out.tempK = tempK;
  out.lnT = Math.log(tempK);
  return out;
}

/** 10^x by exp, several times faster than Math.pow(10, x) in V8 and equal to 1 ulp-scale rounding. */
export function exp10(x: number): number {
  return Math.exp(Math.LN10 * x);
}
