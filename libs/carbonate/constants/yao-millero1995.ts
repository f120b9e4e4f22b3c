// Yao W. & Millero F.J. (1995), Environ. Sci. 2, 101-135, as compiled by Millero (1995), Geochim. Cosmochim.
// Acta 59, 661-677: phosphoric acid and silicic acid constants on the seawater scale. Used only when
// phosphate or silicate are given (science spec 3.1 omits them by default).

export interface PhosphateConstants {
  kp1: number;
  kp2: number;
  kp3: number;
}

/** KP1, KP2, KP3 (mol kg-1, seawater scale), written into `out`. Valid t 0-40 degC, S 0-40 (Millero 1995). */
export function kpYaoMillero1995Sws(salinity: number, tempK: number, out: PhosphateConstants): void {
  const s05 = Math.sqrt(salinity);
  const lnT = Math.log(tempK);
  out.kp1 = Math.exp(
    -4576.752 / tempK +
      115.54 -
      18.453 * lnT +
      (-106.736 / tempK + 0.69171) * s05 +
      (-0.65643 / tempK - 0.01844) * salinity,
  );
  out.kp2 = Math.exp(
    -8814.715 / tempK +
      172.1033 -
      27.927 * lnT +
      (-160.34 / tempK + 1.3566) * s05 +
      (0.37335 / tempK - 0.05778) * salinity,
  );
  out.kp3 = Math.exp(
    -3070.75 / tempK - 18.126 + (17.27039 / tempK + 2.81197) * s05 + (-44.99486 / tempK - 0.09984) * salinity,
  );
}

/** KSi of Si(OH)4 (mol kg-SW-1, seawater scale). Valid t 0-40 degC, S 0-40. */
export function ksiYaoMillero1995Sws(salinity: number, tempK: number): number {
  const i = (19.924 * salinity) / (1000 - 1.005 * salinity);
  const lnT = Math.log(tempK);
  return (
    Math.exp(
      -8904.2 / tempK +
        117.4 -
        19.334 * lnT +
        (-458.79 / tempK + 3.5913) * Math.sqrt(i) +
        (188.74 / tempK - 1.5998) * i +
        (-12.1652 / tempK + 0.07871) * i * i,
    ) *
    (1 - 0.001005 * salinity)
  );
}
