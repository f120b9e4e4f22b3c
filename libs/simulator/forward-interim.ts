// Downstream concentration from the control-volume budget (science 6.4), kept local until libs/metabolism
// exports `forwardDownstream` from its index; chemistry.ts calls it in one place only.
// Steady: C_B = C_A + Q L/U. With storage (backward window difference, window W):
// C_B,k = [Q - (C_A,k - C_A,k-1 - C_B,k-1)/(2W) + U C_A,k/L] / [1/(2W) + U/L], Q = (F_b - F_as)/(rho h).

export interface ForwardInput {
  /** Upstream concentration now and one window earlier, and the downstream one a window earlier. */
  cUp: number;
  cUpPrev: number;
  cDownPrev: number;
  /** Source term (F_b - F_as)/(rho h), concentration units per second. */
  qPerS: number;
  uMS: number;
  lengthM: number;
  windowS: number;
}

/** Check: with cUpPrev = cUp and cDownPrev = the steady value, the result is the steady value
 * cUp + Q L/U (the storage term vanishes; algebra of science 6.4). */
export function forwardDownstreamInterim(x: ForwardInput): number {
  const a = 1 / (2 * x.windowS);
  const b = x.uMS / x.lengthM;
  return (x.qPerS - a * (x.cUp - x.cUpPrev - x.cDownPrev) + b * x.cUp) / (a + b);
}
