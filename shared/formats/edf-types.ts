/**
 * Types, limits and the typed error of the EDF / EDF+ / BDF / BDF+ reader and writer.
 *
 * Formats: EDF (Kemp, Värri, Rosa, Nielsen & Gade 1992, Electroencephalogr Clin Neurophysiol
 * 82(5):391-393); EDF+ (Kemp & Olivan 2003, Clin Neurophysiol 114(9):1755-1761); BDF, the
 * 24-bit variant (version byte 0xFF + "BIOSEMI", 3-byte samples), and BDF+ (reserved field
 * "BDF+C"/"BDF+D", annotation signal "BDF Annotations") as commonly written.
 */

/** File flavour, detected from the version and reserved header fields. */
export type EdfFormat = 'EDF' | 'EDF+C' | 'EDF+D' | 'BDF' | 'BDF+C' | 'BDF+D';

/** One signal's header entry (the per-signal part of the header, ns x 256 bytes). */
export interface EdfSignalHeader {
  /** Label as in the file, trailing spaces removed (eegmmidb keeps its dots: 'C3..'). */
  label: string;
  transducer: string;
  physicalDimension: string;
  physicalMin: number;
  physicalMax: number;
  digitalMin: number;
  digitalMax: number;
  prefiltering: string;
  /** Samples of this signal in one data record (for an annotation signal: 2- or 3-byte slots). */
  samplesPerRecord: number;
  /** The per-signal 32-byte reserved field, trailing spaces removed. */
  reserved: string;
  /** samplesPerRecord / recordDurationS; 0 when the record duration is 0. */
  sampleRateHz: number;
  /** True for an 'EDF Annotations' / 'BDF Annotations' signal (its samples are TAL bytes). */
  isAnnotation: boolean;
}

/** Everything in the header, parsed and checked against the file's length. */
export interface EdfHeader {
  format: EdfFormat;
  /** Bytes per sample: 2 (EDF) or 3 (BDF). */
  bytesPerSample: 2 | 3;
  /** Version field as text: '0' for EDF, 'BIOSEMI' (after the 0xFF byte) for BDF. */
  version: string;
  patientId: string;
  recordingId: string;
  /** Start date field as written, 'dd.mm.yy' (or 'dd.mm.yy' with literal 'yy' after 2084). */
  startDateField: string;
  /** Start time field as written, 'hh.mm.ss'. */
  startTimeField: string;
  /**
   * Start of the recording as local date-time without zone, 'YYYY-MM-DDTHH:MM:SS' (EDF stores
   * no zone). The year comes from the EDF+ recording id's 'Startdate dd-MMM-yyyy' when present,
   * else from 'yy' with the 1985 clipping rule (85-99 -> 19yy, 00-84 -> 20yy).
   */
  startTime: string;
  headerBytes: number;
  /** The 44-byte reserved field, trailing spaces removed ('EDF+C', '24BIT', ...). */
  reserved: string;
  /** Number of data records (for plain EDF/BDF a -1 in the file is inferred from the size). */
  records: number;
  recordDurationS: number;
  /** Bytes of one data record = bytesPerSample * sum of samplesPerRecord. */
  recordBytes: number;
  signals: EdfSignalHeader[];
}

/** One annotation (EDF+ TAL entry): one entry per annotation text. */
export interface EdfAnnotation {
  /** Seconds from the header's start time (EDF+ TAL onsets are relative to it). */
  onsetS: number;
  durationS: number | null;
  text: string;
}

/** A whole file: header, physical samples, annotations and record start times. */
export interface EdfFile extends EdfHeader {
  /** One array per ordinary (non-annotation) signal, physical units, records * samplesPerRecord long. */
  data: Float64Array[]; // [ordinary signal][sample]
  /** dataSignalIndex[k] = index in `signals` of data[k]. */
  dataSignalIndex: number[];
  /** Annotations in file order; time-keeping TALs excluded. */
  annotations: EdfAnnotation[];
  /** Start of every data record, seconds from the header start time (EDF+D gaps show here). */
  recordStartsS: Float64Array; // [record]
}

/** Options of the readers. */
export interface EdfReadOptions {
  /** Refuse files (or claimed sizes) larger than this; default DEFAULT_MAX_BYTES (512 MiB). */
  maxBytes?: number;
}

/**
 * Limits the reader enforces (documented choices, not from the specifications):
 * - at most MAX_SIGNALS signals (the field allows 9999; no EEG amplifier comes close);
 * - files larger than maxBytes (default 512 MiB) are refused before anything is allocated;
 * - every count must be consistent with the actual byte length before any array is created,
 *   so the largest allocation is 8 / bytesPerSample times the file size.
 */
export const MAX_SIGNALS = 4096;
/** Default opts.maxBytes of the readers: 512 MiB (about an hour of 64 channels at 1 kHz in 16 bits). */
export const DEFAULT_MAX_BYTES = 512 * 1024 * 1024;

/** Digital range of 16-bit EDF samples (two's complement). */
export const EDF_DIGITAL_RANGE: readonly [number, number] = [-32768, 32767];
/** Digital range of 24-bit BDF samples (two's complement). */
export const BDF_DIGITAL_RANGE: readonly [number, number] = [-8388608, 8388607];

/**
 * Thrown for any malformed or refused file. `field` names the header field (e.g. 'records',
 * 'signals[3].digitalMax'), or 'fileSize' / 'header' / 'annotations' / 'maxBytes'.
 */
export class EdfFormatError extends Error {
  constructor(readonly field: string, detail: string) {
    super(`${field}: ${detail}`);
    this.name = 'EdfFormatError';
  }
}
