/**
 * Signal processing for EEG: Butterworth and notch design as second-order sections, streaming
 * (stateful) and zero-phase SOS filtering, common average reference, rational resampling.
 * Each module documents its method and citation; this file only gathers the public names.
 */
export type { FilterKind, Sos } from './sos';
export { checkSos } from './sos';
export { butterSos } from './butter';
export { iirNotchSos } from './notch';
export { sosMagnitude, sosMagnitudeDb } from './response';
export type { SosState } from './sosfilt';
export { createSosState, sosfilt, sosfiltChunk, sosfiltChunk1, sosfiltfilt, sosfiltfilt1, sosfiltZi, steadyStateFor }
  from './sosfilt';
export { commonAverageReference, commonAverageReferenceInPlace } from './reference';
export { resample, resampleFactors, resampleFilter } from './resample';
