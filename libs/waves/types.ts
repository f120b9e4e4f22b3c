// Public types of the waves library (docs/methods/waves.md; docs/contract-v1.md section 4, record `waves`).

/** QARTOD flags: 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing. */
export type QartodFlag = 1 | 2 | 3 | 4 | 9;

/** One bottom-pressure burst. */
export interface BurstInput {
  /** absolute pressure samples [dbar]; null or non-finite samples are gaps */
  readonly pDbar: ArrayLike<number | null>;
  /** sampling rate [Hz] */
  readonly fsHz: number;
  /** time of the first sample [ms since epoch, UTC] */
  readonly t0Ms: number;
  /** pressure sensor height above the bed [m] (`height_m`) */
  readonly sensorHeightM: number;
  /** atmospheric pressure at the burst centre [dbar] (0.01 x hPa); 10.1325 dbar = 1 atm if unknown */
  readonly patmDbar: number;
  /** water density rho(S, t, 0) of the station [kg m-3] */
  readonly rhoKgM3: number;
  /** gravity [m s-2]; default 9.80665 */
  readonly gMS2?: number;
}

/** Tunables; every default is an engineering default of docs/methods/waves.md. */
export interface WaveOptions {
  /** Welch segment length (power of two); default from the burst length (4.2) */
  readonly nperseg?: number;
  /** upper cutoff limit [Hz], default 1.0 */
  readonly maxFreqHz?: number;
  /** smallest Kp^2 kept (at most 1/minKp2 energy gain), default 0.1 */
  readonly minKp2?: number;
  /** lower edge of the infragravity band [Hz], default 0.005 */
  readonly igLowHz?: number;
  /** infragravity / sea-swell split [Hz], default 0.04 */
  readonly splitHz?: number;
  /** dry margin: sensor dry if mean head < this [m], default 0.05 */
  readonly dryMarginM?: number;
  /** flat/clipped burst if sd of the detrended head < this [m], default 0.002 */
  readonly minSdM?: number;
  /** despike threshold in robust sigmas, default 5 */
  readonly spikeSigma?: number;
  /** bursts longer than this are detrended quadratically [s], default 3600 */
  readonly quadraticDetrendAboveS?: number;
  /** IG statistics only if df <= this [Hz], default 0.005 */
  readonly maxIgDfHz?: number;
  /** zero-crossing statistics flagged 3 below this many waves, default 50 */
  readonly minWaves?: number;
  /**
   * If set [Hz], bins from the cutoff up to this frequency (at most fs/2) get an f^-4 tail fitted to the last
   * quarter of the band below the cutoff (Jones & Monismith 2007); spectral statistics then include it. Off
   * by default; the zero-crossing reconstruction never uses it.
   */
  readonly tailToHz?: number;
}

export interface WavesOk {
  readonly ok: true;
  /** overall flag of the bulk (spectral) values */
  readonly flag: QartodFlag;
  /** burst centre t0 + N/(2 fs) [ms] */
  readonly tCentreMs: number;
  readonly hm0M: number;
  readonly tpS: number;
  readonly tm01S: number;
  readonly tm02S: number;
  readonly hrmsM: number;
  readonly hm0SsM: number;
  /** null when the IG band is not evaluated (df too coarse) */
  readonly hm0IgM: number | null;
  /** mean water depth h = mean head + sensor height [m] */
  readonly depthM: number;
  /** upper frequency limit used [Hz] */
  readonly cutoffHz: number;
  /** Welch degrees of freedom per bin */
  readonly dof: number;
  /** 95 % confidence factors of each spectral bin: S_true in [lower S, upper S] (Jenkins & Watts 1968) */
  readonly psdCi95: { readonly lower: number; readonly upper: number };
  /** sampling standard error of hm0 [m] (upper bound, 4.4) */
  readonly hm0SigmaM: number;
  readonly h13M: number | null;
  readonly h110M: number | null;
  readonly hmaxM: number | null;
  readonly tzS: number | null;
  readonly nWaves: number;
  readonly flags: { readonly ss: QartodFlag; readonly ig: QartodFlag; readonly zeroCrossing: QartodFlag };
  readonly notes: string[];
}

export interface WavesFail {
  readonly ok: false;
  readonly flag: 3 | 4 | 9;
  readonly code: WavesErrorCode;
  readonly reason: string;
  readonly depthM?: number;
}

export type WavesResult = WavesOk | WavesFail;

export type WavesErrorCode =
  | 'REEFD_WAVES_EMPTY'
  | 'REEFD_WAVES_BAD_INPUT'
  | 'REEFD_WAVES_TOO_SHORT'
  | 'REEFD_WAVES_NONFINITE'
  | 'REEFD_WAVES_DRY'
  | 'REEFD_WAVES_FLAT'
  | 'REEFD_WAVES_SPIKY'
  | 'REEFD_WAVES_LENGTH_MISMATCH'
  | 'REEFD_WAVES_NO_BAND';
