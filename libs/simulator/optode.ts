// What an oxygen optode's firmware does with its salinity setting: it converts the measured O2 partial
// pressure to a concentration with the solubility at S_set instead of the true S, so it reports
// O2(S_set) = O2(S) / exp[(S - S_set)(B0 + B1 Ts + B2 Ts^2 + B3 Ts^3) + C0 (S^2 - S_set^2)]
// (science 2.4), with the B, C of the Garcia & Gordon (1992, Limnol. Oceanogr. 37, 1307) combined fit
// (mL/L), the usual optode default. The daemon undoes this with libs/seawater's re-compensation.

const B = [-6.24097e-3, -6.93498e-3, -6.90358e-3, -4.29155e-3] as const;
const C0 = -3.1168e-7;

/** The factor O2(S)/O2(S_set) for optode temperature tempC (degC); S, S_set practical salinity, 0-42.
 * Check: S 35 against S_set 0 at 10 degC gives 0.80000 (combined fit, evaluated by libs/seawater's tests). */
export function optodeSalinityFactor(sal: number, salSetting: number, tempC: number): number {
  const ts = Math.log((298.15 - tempC) / (273.15 + tempC));
  const poly = B[0] + ts * (B[1] + ts * (B[2] + ts * B[3]));
  return Math.exp((sal - salSetting) * poly + C0 * (sal * sal - salSetting * salSetting));
}
