/**
 * Array layouts shared by every numeric module. Units: samples in microvolts (µV) unless a
 * name says otherwise; times in seconds (`...S`), rates in hertz (`...Hz`).
 */

/** Continuous multichannel signal. */
export type ChannelMajor = Float64Array[]; // [channel][sample]

/** Cue-locked epochs, each starting at the epoch window's tmin relative to its cue. */
export type Epochs = Float64Array[][]; // [trial][channel][sample]

/** One annotation of a recording (EDF+ TAL entry, cue marker, ...). */
export interface Annotation {
  onsetS: number;
  durationS: number | null;
  text: string;
}

/** Continuous EEG with its cue markers, independent of the file format it came from. */
export interface Recording {
  channelNames: string[];
  sampleRateHz: number;
  data: ChannelMajor; // [channel][sample], µV
  annotations: Annotation[];
  /** ISO 8601 start of the first sample, when known. */
  startTime: string | null;
}

/** Thrown when an argument has the wrong shape; names the field, what was expected and what came. */
export class ShapeError extends Error {
  constructor(readonly field: string, detail: string) {
    super(`${field}: ${detail}`);
    this.name = 'ShapeError';
  }
}

/** Thrown when a hyperparameter or option is out of its valid range. */
export class ParamError extends Error {
  constructor(readonly field: string, detail: string) {
    super(`${field}: ${detail}`);
    this.name = 'ParamError';
  }
}
