/**
 * Time-frequency analysis for EEG: complex Morlet continuous wavelet transform (Torrence & Compo
 * 1998; n-cycle wavelets after Tallon-Baudry et al. 1997 and Cohen 2019) with a reusable plan,
 * an exact fast decimated inverse, power and log power, the cone of influence; Welch's PSD with
 * SciPy's defaults (Welch 1967); a real DFT of any length (Bluestein 1970).
 * Each module documents its method and citation; this file only gathers the public names.
 */
export { logSpacedFrequencies } from './frequencies';
export type { MorletKernel, MorletNormalisation, MorletPadding, MorletParams, MorletPlan, MorletTimeGrid }
  from './morlet-plan';
export { BAND_SIGMAS, MAX_FFT_SIZE, SUPPORT_SIGMAS, createMorletPlan, waveletSpectrum } from './morlet-plan';
export type { ComplexTf } from './cwt';
export { DEFAULT_LOG_POWER_FLOOR, cwt, cwtLogPower, cwtPower } from './cwt';
export { coneOfInfluence, edgeMask } from './coi';
export type { WelchParams, WelchResult } from './welch';
export { welchPsd } from './welch';
export type { RealDft } from './dft';
export { createRealDft } from './dft';
