/**
 * Pre-processing as it runs live, and the same code offline.
 *
 * The continuous signal goes through a causal Butterworth band-pass (second-order sections),
 * an optional IIR notch, then the common average reference (CAR), with the filter state carried
 * from chunk to chunk; epochs are cut from the filtered signal at each cue. Offline training
 * runs exactly this path on a whole run: a fresh state and one chunk (`preprocessRecording`).
 * Filtering first and re-referencing after is the same linear map as the other order (every
 * channel gets the same filter), and it keeps CAR memoryless on filtered samples.
 *
 * Start-up: the filter state is initialised from the first sample of each channel as a steady
 * state (SciPy's `sosfilt_zi` × x[0]; Gustafsson 1996), so a DC offset does not ring through the
 * first seconds. The stream and the offline path do this identically, so their outputs agree
 * to rounding for any chunking.
 *
 * Missing samples: a non-finite sample (NaN from a dropped chunk or an EDF+D gap) would stay in
 * the IIR state for ever, so before filtering it is replaced by the channel's last finite value
 * (0 before any), the same way live and offline. Each FilteredEpoch counts the filled samples in
 * its window and in the second before it (where the filter's memory mostly lies), so a trial can
 * be flagged; the probabilities of such trials are not to be trusted.
 *
 * Sample rule (same as shared/decoder/epochs.ts): a cue at sample c has its epoch start at
 * c + round(tminS·fs) and round(tmaxS·fs) − round(tminS·fs) samples; the epoch is complete once
 * sample start + length − 1 has arrived.
 */
import { butterSos, commonAverageReferenceInPlace, iirNotchSos, sosfiltChunk, steadyStateFor, type Sos, type SosState } from '../dsp';
import { ParamError, ShapeError, type ChannelMajor, type Recording } from '../types';
import { normaliseChannelName } from '../montage';

/** Everything the live path needs to turn raw samples into filtered, re-referenced samples. */
export interface PreprocessSpec {
  sampleRateHz: number;
  /** Channel order every chunk must follow. */
  channelNames: string[];
  /** Butterworth band-pass: order, edges (Hz) and its sections as designed by `butterSos`. */
  bandpass: { order: number; edgesHz: [number, number]; sos: Sos };
  /** Optional IIR notch (SciPy's iirnotch design) applied after the band-pass. */
  notch: { f0Hz: number; q: number; sos: Sos } | null;
  /** Common average reference over all channels after filtering. */
  car: boolean;
}

/** Epoch window relative to the cue, seconds (tmax exclusive), and its sample form. */
export interface EpochWindow {
  tminS: number;
  tmaxS: number;
}

/** Hyperparameters of `designPreprocessing`. */
export interface PreprocessParams {
  sampleRateHz: number;
  channelNames: string[];
  /** Band-pass edges, Hz. */
  bandpassHz: [number, number];
  /** Butterworth order (band-pass of order N has N sections); default 4. */
  order?: number;
  /** Notch frequency (50 or 60 Hz mains), or null for none; default null. */
  notchHz?: number | null;
  /** Notch quality factor; default 30 (common practice for mains). */
  notchQ?: number;
  car: boolean;
}

/** Designs the filters (data, not code: an artifact stores the sections). */
export function designPreprocessing(p: PreprocessParams): PreprocessSpec {
  const order = p.order ?? 4;
  const notchHz = p.notchHz ?? null;
  const q = p.notchQ ?? 30;
  if (p.channelNames.length < 1) throw new ParamError('channelNames', 'expected at least one channel');
  return {
    sampleRateHz: p.sampleRateHz,
    channelNames: [...p.channelNames],
    bandpass: { order, edgesHz: [p.bandpassHz[0], p.bandpassHz[1]], sos: butterSos(order, p.bandpassHz, 'bandpass', p.sampleRateHz) },
    notch: notchHz === null ? null : { f0Hz: notchHz, q, sos: iirNotchSos(notchHz, q, p.sampleRateHz) },
    car: p.car,
  };
}

/** The cascade the stream runs: band-pass sections, then the notch section(s). */
export function cascadeOf(spec: PreprocessSpec): Sos {
  return spec.notch === null ? spec.bandpass.sos : [...spec.bandpass.sos, ...spec.notch.sos];
}

/** Sample offset of the epoch start from the cue sample, and the epoch length in samples. */
export function epochSamples(window: EpochWindow, sampleRateHz: number): { offset: number; length: number } {
  const offset = Math.round(window.tminS * sampleRateHz);
  const length = Math.round(window.tmaxS * sampleRateHz) - offset;
  if (!(length >= 1)) throw new ParamError('window', `expected at least one sample, got [${window.tminS}, ${window.tmaxS}) s`);
  return { offset, length };
}

/** A filtered, re-referenced epoch cut by a DecoderStream or `preprocessRecording` (never raw samples). */
export interface FilteredEpoch {
  readonly kind: 'filtered-epoch';
  /** [channel][sample], µV, in the decoder's channel order; first sample = cue + tmin. */
  readonly data: ChannelMajor;
  /** Sample index of the cue in the stream. */
  readonly cueSample: number;
  /** Samples (any channel) filled in for missing data in the window or the second before it. */
  readonly filledSamples: number;
}

/**
 * Raw (unfiltered) samples around one cue, for a decoder that should filter them itself. The
 * filter starts fresh (steady state) at the segment's first sample, so give it a run-in before
 * the epoch: the longer, the closer the result to the continuous stream's.
 */
export interface RawSegment {
  readonly kind: 'raw-segment';
  /** [channel][sample], µV, in the decoder's channel order. */
  readonly data: ChannelMajor;
  /** Index (within `data`) of the cue sample. */
  readonly cueIndex: number;
}

/** Live pre-processing of a feed: push raw chunks, ask for a filtered epoch once it is complete. */
export interface DecoderStream {
  /** Samples received so far (the next chunk's first sample has this index). */
  readonly samplesReceived: number;
  /** Filters one raw chunk [channel][sample] (µV, decoder channel order); advances the state. */
  push(chunk: ChannelMajor): void;
  /**
   * The filtered epoch of a cue at stream sample `cueSample`, or null while its last sample has
   * not arrived. Throws ParamError when the window starts before sample 0 or before the oldest
   * sample still held (`historyS`).
   */
  epochAt(cueSample: number): FilteredEpoch | null;
}

/**
 * Replaces non-finite samples by the channel's last finite value (module comment), in place of
 * a copy: returns the chunk itself when every sample is finite.
 * @param last per channel, the last finite value seen (NaN: none yet, then 0 is used); advanced
 * @param filled optional per-sample flags of the chunk, set to 1 where any channel was filled
 */
export function holdMissing(chunk: ChannelMajor, last: Float64Array, filled?: Uint8Array): ChannelMajor {
  let out: ChannelMajor | null = null;
  for (let c = 0; c < chunk.length; c++) {
    const x = chunk[c]!;
    let prev = last[c]!;
    for (let i = 0; i < x.length; i++) {
      const v = x[i]!;
      if (Number.isFinite(v)) { prev = v; continue; }
      if (out === null) out = chunk.map((ch) => Float64Array.from(ch));
      out[c]![i] = Number.isNaN(prev) ? 0 : prev;
      if (filled) filled[i] = 1;
    }
    last[c] = prev;
  }
  return out ?? chunk;
}

/** Options of `createPreprocessStream`. */
export interface StreamOptions {
  /** Filtered history kept for late epoch requests, seconds beyond the epoch span; default 30. */
  historyS?: number;
}

/**
 * A stream over `spec` for epochs of `window` (see module comment for the state and sample
 * rules). The decoder-level `createDecoderStream` (predict.ts) wraps this with a loaded decoder.
 */
export function createPreprocessStream(spec: PreprocessSpec, window: EpochWindow, opts: StreamOptions = {}): DecoderStream {
  const fs = spec.sampleRateHz;
  const channels = spec.channelNames.length;
  const sos = cascadeOf(spec);
  const { offset, length } = epochSamples(window, fs);
  const capacity = Math.max(length, 1) + Math.max(offset, 0) + Math.ceil((opts.historyS ?? 30) * fs);
  const ring = Array.from({ length: channels }, () => new Float64Array(capacity));
  const filledRing = new Uint8Array(capacity);
  const last = new Float64Array(channels).fill(NaN);
  const lookBack = Math.round(fs);
  let state: SosState | null = null;
  let received = 0;
  let scratch = new Float64Array(0);

  return {
    get samplesReceived() { return received; },
    push(chunk) {
      if (chunk.length !== channels) throw new ShapeError('chunk', `expected ${channels} channels, got ${chunk.length}`);
      const n = chunk[0]!.length;
      if (n === 0) return;
      const filled = new Uint8Array(n);
      const held = holdMissing(chunk, last, filled);
      if (state === null) state = steadyStateFor(sos, Float64Array.from(held, (c) => c[0]!));
      const y = sosfiltChunk(sos, held, state);
      if (spec.car) {
        if (scratch.length < n) scratch = new Float64Array(n);
        commonAverageReferenceInPlace(y, undefined, scratch);
      }
      for (let c = 0; c < channels; c++) {
        const src = y[c]!, dst = ring[c]!;
        // Only the last `capacity` samples of a long chunk can be held.
        const from = Math.max(0, n - capacity);
        for (let i = from; i < n; i++) dst[(received + i) % capacity] = src[i]!;
      }
      for (let i = Math.max(0, n - capacity); i < n; i++) filledRing[(received + i) % capacity] = filled[i]!;
      received += n;
    },
    epochAt(cueSample) {
      if (!Number.isInteger(cueSample)) throw new ParamError('cueSample', `expected an integer sample index, got ${cueSample}`);
      const start = cueSample + offset;
      if (start < 0) throw new ParamError('cueSample', `epoch would start at sample ${start}, before the stream began`);
      if (start + length > received) return null;
      if (start < received - capacity) {
        throw new ParamError('cueSample', `epoch starting at sample ${start} is older than the ${capacity} samples held`);
      }
      const data = ring.map((r) => {
        const out = new Float64Array(length);
        for (let i = 0; i < length; i++) out[i] = r[(start + i) % capacity]!;
        return out;
      });
      let filledSamples = 0;
      for (let t = Math.max(0, start - lookBack, received - capacity); t < start + length; t++) filledSamples += filledRing[t % capacity]!;
      return { kind: 'filtered-epoch', data, cueSample, filledSamples };
    },
  };
}

/**
 * Offline form of the live path: the whole run as one chunk through a fresh stream (missing
 * samples held as in the stream).
 * @param data [channel][sample] raw µV in the spec's channel order (not modified)
 * @returns [channel][sample] filtered and re-referenced µV
 */
export function preprocessContinuous(spec: PreprocessSpec, data: ChannelMajor): ChannelMajor {
  const channels = spec.channelNames.length;
  if (data.length !== channels) throw new ShapeError('data', `expected ${channels} channels, got ${data.length}`);
  const n = data[0]?.length ?? 0;
  if (n === 0) return data.map(() => new Float64Array(0));
  const sos = cascadeOf(spec);
  const held = holdMissing(data, new Float64Array(channels).fill(NaN));
  const state = steadyStateFor(sos, Float64Array.from(held, (c) => c[0]!));
  const y = sosfiltChunk(sos, held, state);
  return spec.car ? commonAverageReferenceInPlace(y) : y;
}

/**
 * For each name in `wanted`, the index of the same electrode in `available` (matched by canonical
 * 10-10 name), e.g. to put a feed's chunks in a decoder's channel order:
 * `const idx = channelOrder(feed.channelNames, decoder.preprocess.channelNames);
 *  stream.push(Array.from(idx, (i) => chunk[i]!))`.
 * @throws ShapeError naming the first channel `available` lacks
 */
export function channelOrder(available: readonly string[], wanted: readonly string[]): Int32Array {
  const index = new Map(available.map((n, i) => [normaliseChannelName(n), i]));
  return Int32Array.from(wanted, (name) => {
    const i = index.get(normaliseChannelName(name));
    if (i === undefined) throw new ShapeError('channelNames', `no channel '${name}' among [${available.join(', ')}]`);
    return i;
  });
}

/**
 * The recording's channels in the order `names` asks for, matched by canonical 10-10 name
 * (`normaliseChannelName`, so 'C3..' matches 'C3'). The arrays are shared, not copied.
 * @throws ShapeError naming the first missing channel
 */
export function channelsInOrder(rec: Recording, names: readonly string[]): ChannelMajor {
  return Array.from(channelOrder(rec.channelNames, names), (i) => rec.data[i]!);
}

/**
 * A recording pre-processed as the live path would (fresh state, one chunk), with its channels
 * put in the spec's order; annotations and timing unchanged.
 */
export function preprocessRecording(spec: PreprocessSpec, rec: Recording): Recording {
  if (rec.sampleRateHz !== spec.sampleRateHz) {
    throw new ShapeError('rec.sampleRateHz', `expected ${spec.sampleRateHz} Hz, got ${rec.sampleRateHz} Hz`);
  }
  return { ...rec, channelNames: [...spec.channelNames], data: preprocessContinuous(spec, channelsInOrder(rec, spec.channelNames)) };
}
