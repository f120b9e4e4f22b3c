// Public API of the waves library: bottom-pressure wave statistics (docs/methods/waves.md) and PUV direction (4.7).
export { analyzeBurst, PATM_STANDARD_DBAR } from './analyze.js';
export { solveDispersion, pressureResponse, guoGuess, G_STANDARD } from './dispersion.js';
export {
  welchPsd,
  chooseSegmentLength,
  segmentCount,
  welchDof,
  hannWindow,
  type WelchResult,
} from './welch.js';
export { chi2Quantile, regularizedGamma, lnGamma } from './chi2.js';
export { cutoffFrequency, type CutoffReason } from './bulk.js';
export { puvDirection, type PuvInput, type PuvOptions, type PuvResult } from './puv.js';
export type {
  BurstInput,
  WaveOptions,
  WavesResult,
  WavesOk,
  WavesFail,
  WavesErrorCode,
  QartodFlag,
} from './types.js';
export { jonswapShape, jonswapPressureBurst, type SeaSpec, type PressureBurstSpec } from './synthetic.js';
export { depthSigmaM, type DepthSigmaInput } from './uncertainty.js';
export { WAVES_ERRORS } from './errors.js';
