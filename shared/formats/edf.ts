/**
 * EDF / EDF+ / BDF / BDF+ in one import: read (readEdf, readEdfHeader, readEdfAnnotations),
 * convert (edfToRecording) and write (writeEdfPlus). Pure TypeScript on Uint8Array; no I/O.
 * Kemp et al. 1992 (EDF); Kemp & Olivan 2003 (EDF+).
 */
export { readEdfHeader, type EdfHeaderOptions } from './edf-header';
export { readEdf, readEdfAnnotations, type EdfAnnotationsResult } from './edf-read';
export { edfToRecording, type EdfToRecordingOptions } from './edf-recording';
export { writeEdfPlus, type WriteEdfPlusOptions } from './edf-write';
export {
  BDF_DIGITAL_RANGE, DEFAULT_MAX_BYTES, EDF_DIGITAL_RANGE, EdfFormatError, MAX_SIGNALS,
  type EdfAnnotation, type EdfFile, type EdfFormat, type EdfHeader, type EdfReadOptions, type EdfSignalHeader,
} from './edf-types';
