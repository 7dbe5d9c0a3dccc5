/**
 * EdfFile -> Recording: the format-independent continuous signal the rest of Aftercue uses.
 */
import { ParamError, type Annotation, type Recording } from '../types';
import { EdfFormatError, type EdfFile } from './edf-types';

/** Options of edfToRecording. */
export interface EdfToRecordingOptions {
  /** Ordinary signals to keep, by label exactly as in the file ('C3..'); default all, in file order. */
  channels?: string[];
  /**
   * EDF+D gaps are filled with NaN; refuse when the filled length per channel would exceed this.
   * Default: twice the stored samples plus one hour of samples.
   */
  maxFilledSamples?: number;
}

/**
 * Builds a Recording from a read file: the ordinary signals (all or opts.channels), which must
 * share one sample rate; labels as in the file; annotations passed through.
 * Time origin: sample 0 is the start of record 0. When record 0 starts later than the header
 * time (EDF+ sub-second start '+0.5'), startTime moves by that much and annotation onsets are
 * shifted to stay relative to sample 0. Gaps between records (EDF+D, read from the time-keeping
 * TALs) are filled with NaN so that sample index = time * rate holds throughout; NaN there
 * means "not recorded". Without gaps the data arrays are the file's own (not copied).
 * @throws ParamError('channels') for an unknown label; EdfFormatError naming the signal when
 *   the rates differ, or when no ordinary signal exists or gap filling exceeds the limit
 */
export function edfToRecording(file: EdfFile, opts: EdfToRecordingOptions = {}): Recording {
  const picked = pickSignals(file, opts.channels);
  const first = file.signals[file.dataSignalIndex[picked[0]!]!]!;
  for (const k of picked) {
    const i = file.dataSignalIndex[k]!;
    const s = file.signals[i]!;
    if (s.samplesPerRecord !== first.samplesPerRecord) {
      throw new EdfFormatError(`signals[${i}].samplesPerRecord`, `'${s.label}' is sampled at ${s.sampleRateHz} Hz but ` +
        `'${first.label}' at ${first.sampleRateHz} Hz; a recording needs one common rate (choose channels)`);
    }
  }
  const rate = first.sampleRateHz;
  const n = first.samplesPerRecord;
  const origin = file.records > 0 ? file.recordStartsS[0]! : 0;
  const recordOffsets = sampleOffsets(file, rate, n, origin);
  const total = file.records > 0 ? recordOffsets[file.records - 1]! + n : 0;
  const contiguous = total === file.records * n;
  const limit = opts.maxFilledSamples ?? 2 * file.records * n + Math.ceil(rate * 3600);
  if (!contiguous && total > limit) {
    throw new EdfFormatError('annotations', `record times span ${total} samples per channel with gaps filled, ` +
      `above the limit of ${limit} (maxFilledSamples)`);
  }
  const data = picked.map((k) => {
    const stored = file.data[k]!;
    if (contiguous) return stored;
    const out = new Float64Array(total).fill(NaN);
    for (let r = 0; r < file.records; r++) out.set(stored.subarray(r * n, (r + 1) * n), recordOffsets[r]!);
    return out;
  });
  const annotations: Annotation[] = file.annotations.map((a) => ({ onsetS: a.onsetS - origin, durationS: a.durationS, text: a.text }));
  return {
    channelNames: picked.map((k) => file.signals[file.dataSignalIndex[k]!]!.label),
    sampleRateHz: rate,
    data,
    annotations,
    startTime: origin === 0 ? file.startTime : shiftIsoLocal(file.startTime, origin),
  };
}

/** Indices into file.data of the requested ordinary signals. */
function pickSignals(file: EdfFile, channels: string[] | undefined): number[] {
  if (file.data.length === 0) throw new EdfFormatError('signals', 'the file has no ordinary signals, only annotations');
  const labels = file.dataSignalIndex.map((i) => file.signals[i]!.label);
  if (channels === undefined) return labels.map((_, k) => k);
  if (channels.length === 0) throw new ParamError('channels', 'expected at least one channel label');
  return channels.map((name) => {
    const k = labels.indexOf(name);
    if (k < 0) throw new ParamError('channels', `no ordinary signal labelled '${name}'; the file has ${labels.join(', ')}`);
    return k;
  });
}

/**
 * First sample index of each record, from its start time. A start that rounds into the previous
 * record (sub-sample jitter in the TALs) is moved to that record's end.
 */
function sampleOffsets(file: EdfFile, rate: number, n: number, origin: number): number[] {
  const out: number[] = [];
  let end = 0;
  for (let r = 0; r < file.records; r++) {
    const at = Math.max(end, Math.round((file.recordStartsS[r]! - origin) * rate));
    out.push(at);
    end = at + n;
  }
  return out;
}

/** 'YYYY-MM-DDTHH:MM:SS[.sss]' plus seconds, kept zone-less; millisecond resolution. */
function shiftIsoLocal(iso: string, seconds: number): string {
  const ms = Date.parse(iso + 'Z') + Math.round(seconds * 1000);
  return new Date(ms).toISOString().replace(/Z$/, '').replace(/\.000$/, '');
}
