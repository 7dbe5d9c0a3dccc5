/**
 * The frozen decoder as the live engine sees it: its pre-processing (causal Butterworth band-pass,
 * optional notch, CAR; shared/decoder/online.ts), its epoch window, and its pure predict
 * (shared/decoder/predict.ts).
 *
 * Online and offline run the same functions: the live path filters chunk by chunk with carried
 * state (`createFilter`: online.ts's cascade, steady-state start and in-place CAR, in the order
 * createPreprocessStream uses; it also hands the filtered chunk to the ring, the display and the
 * quality meter, which the decoder stream does not expose), the offline path filters the whole
 * stored run at once (`preprocessContinuous`, fresh state, one chunk). sosfilt's per-sample
 * arithmetic does not depend on the chunking, so both give the same epochs, and both score them
 * with `predictFilteredEpoch`.
 */
import { cascadeOf, preprocessContinuous, type EpochWindow, type PreprocessSpec } from '../../shared/decoder/online';
import { predictFilteredEpoch, type LoadedDecoder } from '../../shared/decoder/predict';
import { commonAverageReferenceInPlace, sosfiltChunk, steadyStateFor, type Sos, type SosState } from '../../shared/dsp';
import type { ChannelMajor } from '../../shared/types';

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

/**
 * The live form of a loaded frozen decoder (shared/decoder/predict.ts). Prediction is
 * `predictFilteredEpoch`, the same function offline predict calls on epochs of the whole stored
 * run; the feature stamp is taken when the decoder's decision value (features and linear score,
 * computed in one pass by `LoadedDecoder.decision`) is in, the predict stamp when the probability is.
 */
export function liveDecoderFromLoaded(d: LoadedDecoder): LiveDecoder {
  const spec = d.preprocess;
  const epoch = { offset: d.epochOffset, length: d.epochLength };
  let onDecision: (() => void) | undefined;
  // The same decoder with a stamp after its decision function (no other change).
  const timed: LoadedDecoder = { ...d, decision: (x) => { const z = d.decision(x); onDecision?.(); return z; } };
  const score = (data: ChannelMajor, cueSample: number, onFeatures?: () => void): Float64Array => {
    onDecision = onFeatures;
    // filledSamples only informs flagging; the engine flags gap- and NaN-filled trials itself.
    const p = predictFilteredEpoch(timed, { kind: 'filtered-epoch', data, cueSample, filledSamples: 0 }).probability;
    onDecision = undefined;
    // Probabilities in class order: P(classes[0]) = 1 - P(classes[1]).
    return Float64Array.of(1 - p, p);
  };
  // The covariance recipe's two feature maps run different decision code (predict.ts).
  const codePath = d.artifact.model.kind === 'covariance' ? `covariance-${d.artifact.model.map ?? 'linear'}` : d.artifact.recipe;
  if (!warmedRecipes.has(codePath)) {
    warmUp(score, spec.channelNames.length, epoch.length);
    warmedRecipes.add(codePath);
  }
  return {
    classes: [...d.classes],
    channelNames: [...spec.channelNames],
    sampleRateHz: spec.sampleRateHz,
    window: { ...d.window },
    epoch,
    createFilter: () => chunkFilter(spec),
    predictEpoch: (x, onFeatures) => score(x, 0, onFeatures),
    predictOffline(raw, cueSamples) {
      const y = preprocessContinuous(spec, raw);
      const total = y[0]?.length ?? 0;
      return cueSamples.map((c) => {
        const start = c + epoch.offset;
        if (start < 0 || start + epoch.length > total) return null;
        return score(y.map((ch) => ch.subarray(start, start + epoch.length)), c);
      });
    },
  };
}

/** Predictions run at load so that the first cue of a session does not pay for V8's compilation. */
const WARM_UP_RUNS = 12;
/**
 * Decision code paths (the recipe, and for covariance its feature map) this process has warmed
 * up. V8 compiles per function, and every decoder of one code path runs the same functions, so
 * one warm-up per path and process suffices:
 * later sessions load without the extra main-thread work (up to ~60 ms for component-tf at
 * 1000 Hz) that would delay the running sessions' trials.
 */
const warmedRecipes = new Set<string>();

/**
 * Scores a deterministic, non-constant epoch a few times: the first calls of the decision
 * function run unoptimised and trigger V8's compiler, which would otherwise land on the first
 * trials' latency. The results are discarded; nothing is stored in the decoder.
 */
function warmUp(score: (data: ChannelMajor, cueSample: number) => Float64Array, channels: number, length: number): void {
  const data = Array.from({ length: channels }, (_, c) => Float64Array.from({ length }, (_v, k) => Math.sin(0.05 * k * (1 + c / channels) + c)));
  for (let i = 0; i < WARM_UP_RUNS; i++) score(data, 0);
}

