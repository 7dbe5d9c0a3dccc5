/**
 * The frozen decoder as the live engine sees it: its pre-processing (causal Butterworth band-pass,
 * optional notch, CAR; shared/decoder/online.ts), its epoch window, and its fitted pipeline
 * split into a feature part and a classifier so each stage can be timed.
 *
 * Online and offline run the same functions: the live path filters chunk by chunk with carried
 * state (`createFilter`), the offline path filters the whole stored run at once
 * (`preprocessContinuous`, fresh state, one chunk); sosfilt's per-sample arithmetic does not
 * depend on the chunking, so both give the same epochs, and `predictEpoch` maps an epoch to
 * class probabilities identically in both.
 */
import { cascadeOf, epochSamples, preprocessContinuous, type EpochWindow, type PreprocessSpec } from '../../shared/decoder/online';
import { isClassifier, type FittedPipeline } from '../../shared/decoder/pipeline';
import { commonAverageReferenceInPlace, sosfiltChunk, steadyStateFor, type Sos, type SosState } from '../../shared/dsp';
import type { ChannelMajor, Epochs } from '../../shared/types';

/** A chunk filter with carried state: raw [channel][sample] µV in, filtered and re-referenced out. */
export interface LiveFilter {
  /**
   * Filters one raw chunk (decoder channel order, all channels the same length). The result may
   * reuse internal buffers: read it before the next call.
   */
  push(chunk: ChannelMajor): ChannelMajor;
}

/** What the engine needs of a frozen decoder. */
export interface LiveDecoder {
  readonly classes: readonly string[];
  /** The channels the decoder reads, in its order. */
  readonly channelNames: readonly string[];
  readonly sampleRateHz: number;
  readonly window: EpochWindow;
  /** Epoch start relative to the cue sample, and its length, in samples. */
  readonly epoch: { offset: number; length: number };
  /** A fresh pre-processing stream (state starts at the first pushed sample). */
  createFilter(): LiveFilter;
  /**
   * Class probabilities of one filtered epoch ([channel][sample], decoder order), one per class.
   * `onFeatures` runs between the feature stages and the classifier (for latency accounting).
   */
  predictEpoch(epoch: ChannelMajor, onFeatures?: () => void): Float64Array;
  /**
   * Offline form: the whole raw run (decoder channel order) filtered at once, then one epoch per
   * cue sample (indices into `raw`); a cue whose epoch leaves the run gives null.
   */
  predictOffline(raw: ChannelMajor, cueSamples: readonly number[]): (Float64Array | null)[];
}

/** The parts a live decoder is made of. */
export interface LiveDecoderParts {
  classes: readonly string[];
  preprocess: PreprocessSpec;
  window: EpochWindow;
  /** Fitted on filtered epochs of `window`; its last stage is a binary classifier. */
  pipeline: FittedPipeline<Epochs>;
}

function chunkFilter(spec: PreprocessSpec): LiveFilter {
  const sos: Sos = cascadeOf(spec);
  const channels = spec.channelNames.length;
  let state: SosState | null = null;
  let out: ChannelMajor = [];
  let scratch = new Float64Array(0);
  const first = new Float64Array(channels);
  return {
    push(chunk) {
      const n = chunk[0]?.length ?? 0;
      if (n === 0) return chunk.map(() => new Float64Array(0));
      if (state === null) {
        for (let c = 0; c < channels; c++) first[c] = chunk[c]![0]!;
        // Same start-up as preprocessContinuous: steady state for the first sample (Gustafsson 1996).
        state = steadyStateFor(sos, first);
      }
      if (out.length !== channels || out[0]!.length !== n) out = Array.from({ length: channels }, () => new Float64Array(n));
      sosfiltChunk(sos, chunk, state, out);
      if (spec.car) {
        if (scratch.length < n) scratch = new Float64Array(n);
        commonAverageReferenceInPlace(out, undefined, scratch);
      }
      return out;
    },
  };
}

/** P(class 1) from a binary classifier as [P(class 0), P(class 1)]. */
function binaryProbabilities(p1: number): Float64Array {
  return Float64Array.of(1 - p1, p1);
}

/** Builds the live decoder from a preprocessing spec, window and fitted pipeline. */
export function liveDecoderFromParts(parts: LiveDecoderParts): LiveDecoder {
  const { preprocess: spec, window, pipeline } = parts;
  if (parts.classes.length !== 2) throw new RangeError(`expected a two-class decoder, got ${parts.classes.length} classes`);
  const stages = pipeline.stages;
  const last = stages[stages.length - 1];
  if (!last || !isClassifier(last)) throw new RangeError('the pipeline must end in a classifier');
  const epoch = epochSamples(window, spec.sampleRateHz);
  const predictEpoch = (x: ChannelMajor, onFeatures?: () => void): Float64Array => {
    let cur: unknown = [x];
    for (let k = 0; k < stages.length - 1; k++) cur = stages[k]!.transform(cur);
    onFeatures?.();
    return binaryProbabilities(last.predictProba(cur)[0]!);
  };
  return {
    classes: [...parts.classes],
    channelNames: [...spec.channelNames],
    sampleRateHz: spec.sampleRateHz,
    window: { ...window },
    epoch,
    createFilter: () => chunkFilter(spec),
    predictEpoch,
    predictOffline(raw, cueSamples) {
      const y = preprocessContinuous(spec, raw);
      const total = y[0]?.length ?? 0;
      return cueSamples.map((c) => {
        const start = c + epoch.offset;
        if (start < 0 || start + epoch.length > total) return null;
        return predictEpoch(y.map((ch) => ch.slice(start, start + epoch.length)));
      });
    },
  };
}
