/**
 * Prediction with a frozen decoder: the same code for a live feed, a replay and offline checks.
 *
 *   const decoder = loadDecoder(JSON.parse(text));        // verifies the SHA-256 seal first
 *   const stream = createDecoderStream(decoder);           // live: raw chunks in, state carried
 *   stream.push(chunk);                                    // [channel][sample] µV, decoder order
 *   const p = stream.predictAt(cueSample);                 // null until the epoch's last sample
 *   predictFilteredEpoch(decoder, stream.epochAt(cue)!);   // the same, in two steps
 *   predictRawEpoch(decoder, { kind: 'raw-segment', data, cueIndex });  // filters a raw segment
 *
 * An epoch is either a FilteredEpoch (cut from the decoder's own stream, already filtered) or a
 * RawSegment (raw samples the decoder filters from a fresh steady state); the two types carry a
 * `kind` tag that each function checks, so one cannot be passed for the other.
 * Scores: component-tf z = b + Σ_{k selected} ⟨W_k, (L_k − μ_k)/σ_k⟩ with L_k the binned Morlet
 * log power of component k = U_k (x − mean) (recipes/morlet-stage.ts); covariance
 * z = b + ⟨W, (P C Pᵀ − S̄)/s⟩ (recipes/covariance.ts). P(classes[1]) = 1/(1 + e^(−z)).
 * These are the fitted pipeline's computations (the covariance one in its equivalent low-rank
 * form, see covarianceDecision); tests check equality to 1e-12.
 */
import { applyUnmixing, type FittedIca } from '../ica/ica';
import { ParamError, ShapeError, type ChannelMajor, type Recording } from '../types';
import { parseArtifact, type ComponentTfModel, type CovarianceModel, type DecoderArtifact } from './artifact';
import {
  channelsInOrder, createPreprocessStream, preprocessContinuous, type DecoderStream, type EpochWindow, type FilteredEpoch,
  type PreprocessSpec, type RawSegment, type StreamOptions,
} from './online';
import { symmetricEig } from '../linalg/symmetric-eig';
import { createSpdLogWorkspace } from '../linalg/spd-log';
import { covarianceFeature } from './recipes/covariance';
import { decodeF64, decodeRows } from './pipeline';
import { binnedLogPower, morletGrid } from './recipes/morlet-stage';
import { sigmoid } from './tracenorm-data';

export type { FilteredEpoch, RawSegment } from './online';

/** A verified artifact with its arrays decoded and its CWT plan built, ready to score epochs. */
export interface LoadedDecoder {
  readonly artifact: DecoderArtifact;
  readonly classes: readonly [string, string];
  readonly preprocess: PreprocessSpec;
  readonly window: EpochWindow;
  readonly epochLength: number; // samples
  readonly epochOffset: number; // samples from the cue to the epoch start
  /** Decision value z (log-odds of classes[1]) of one filtered epoch [channel][sample]. */
  readonly decision: (epoch: ChannelMajor) => number;
}

/** One epoch's prediction. */
export interface EpochPrediction {
  /** P(classes[1]). */
  probability: number;
  /** 0 or 1: classes[1] when probability > 0.5. */
  classIndex: 0 | 1;
  predictedClass: string;
  /** Probability of the predicted class (≥ 0.5). */
  confidence: number;
  /** Log-odds z. */
  decisionValue: number;
}

/**
 * Verifies and loads an artifact (parseArtifact: ArtifactIntegrityError when the seal does not
 * match, ShapeError for a malformed field).
 * @param value the parsed JSON of an artifact
 */
export function loadDecoder(value: unknown): LoadedDecoder {
  const a = parseArtifact(value);
  const preprocess: PreprocessSpec = {
    sampleRateHz: a.sampleRateHz, channelNames: [...a.channelNames],
    bandpass: a.preprocessing.bandpass, notch: a.preprocessing.notch, car: a.preprocessing.car,
  };
  const decision = a.model.kind === 'component-tf' ? componentTfDecision(a.model, a) : covarianceDecision(a.model);
  return {
    artifact: a, classes: [a.classes[0], a.classes[1]], preprocess,
    window: { tminS: a.epoch.tminS, tmaxS: a.epoch.tmaxS }, epochLength: a.epoch.lengthSamples,
    epochOffset: a.epoch.offsetSamples, decision,
  };
}

function componentTfDecision(m: ComponentTfModel, a: DecoderArtifact): (x: ChannelMajor) => number {
  const rows = decodeRows(m.unmixing, 'model.unmixing');
  const ica = { mean: decodeF64(m.mean, 'model.mean'), unmixing: rows, mixing: [] } as unknown as FittedIca;
  const grid = morletGrid({ sampleRateHz: a.sampleRateHz, nSamples: m.cwt.nSamples, lowHz: m.cwt.lowHz, highHz: m.cwt.highHz,
                            count: m.cwt.count, cycles: m.cwt.cycles, binS: m.cwt.binS });
  grid.frequenciesHz.forEach((f, j) => {
    if (Math.abs(f - m.cwt.frequenciesHz[j]!) > 1e-9 * f) throw new ShapeError('model.cwt.frequenciesHz', `grid differs at ${j}: ${f} vs ${m.cwt.frequenciesHz[j]}`);
  });
  const size = m.blockShape.rows * m.blockShape.cols;
  if (grid.frequenciesHz.length * grid.nBins !== size) throw new ShapeError('model.blockShape', `expected ${grid.frequenciesHz.length}×${grid.nBins}`);
  const mu = decodeF64(m.featureMean, 'model.featureMean');
  const sd = decodeF64(m.featureScale, 'model.featureScale');
  const w = decodeF64(m.weights, 'model.weights');
  const power = new Float64Array(size);
  const scratch = new Float64Array(grid.frequenciesHz.length * grid.plan.nTimes);
  return (x) => {
    let acc = m.bias;
    if (rows.length === 0) return acc;
    const acts = applyUnmixing(ica, x);
    acts.forEach((act, k) => {
      binnedLogPower(grid, act, power, 0, scratch);
      const o = k * size;
      let s = 0;
      for (let j = 0; j < size; j++) s += ((power[j]! - mu[o + j]!) / sd[o + j]!) * w[o + j]!;
      acc += s;
    });
    return acc;
  };
}

/**
 * The covariance decision in its low-rank form. With W symmetrised and eigendecomposed as
 * W = Σ_j μ_j u_j u_jᵀ (only the non-zero μ_j: the trace norm keeps few), and f_j = Pᵀ u_j,
 *   z = b + ⟨W, (P C Pᵀ − S̄)/s⟩ = b − ⟨W, S̄⟩/s + Σ_j (μ_j/s) · f_jᵀ C f_j,
 *   f_jᵀ C f_j = (1/T) Σ_t (f_jᵀ (x_t − m))²,
 * i.e. the variance of rank(W) spatially filtered signals (the spatial-filter reading of the
 * second-order trace-norm classifier, Tomioka & Müller 2010 §2.2). C is symmetric, so only W's
 * symmetric part counts. This costs rank(W)·C·T instead of C²·T/2 for the full covariance and
 * equals the stage's computation up to rounding (tests: 1e-12 on probabilities).
 */
function covarianceDecision(m: CovarianceModel): (x: ChannelMajor) => number {
  const p = decodeRows(m.whitening, 'model.whitening');
  const centre = decodeF64(m.centre, 'model.centre');
  const w = decodeF64(m.weight, 'model.weight');
  const r = p.length;
  const c = p[0]?.length ?? 0;
  if (w.length !== r * r) throw new ShapeError('model.weight', `expected ${r * r} values, got ${w.length}`);
  if (m.map === 'log') return logCovarianceDecision(m, p, centre, w);
  const sym = new Float64Array(r * r);
  let offset = m.bias;
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < r; j++) {
      sym[i * r + j] = (w[i * r + j]! + w[j * r + i]!) / 2;
      offset -= (w[i * r + j]! * centre[i * r + j]!) / m.scale;
    }
  }
  const { values, vectors } = symmetricEig(sym, r);
  let top = 0;
  for (const v of values) top = Math.max(top, Math.abs(v));
  const filters: Float64Array[] = [];
  const gains: number[] = [];
  for (let j = 0; j < r; j++) {
    if (!(Math.abs(values[j]!) > 1e-13 * top)) continue;
    const f = new Float64Array(c);
    for (let i = 0; i < r; i++) {
      const u = vectors[i * r + j]!;
      const pi = p[i]!;
      for (let a = 0; a < c; a++) f[a]! += u * pi[a]!;
    }
    filters.push(f);
    gains.push(values[j]! / m.scale);
  }
  const means = new Float64Array(c);
  let y = new Float64Array(0);
  return (x) => {
    const n = x[0]?.length ?? 0;
    if (n < 2) throw new ShapeError('x', `expected at least 2 samples per channel, got ${n}`);
    if (y.length !== n) y = new Float64Array(n);
    for (let a = 0; a < c; a++) {
      const row = x[a]!;
      let s = 0;
      for (let k = 0; k < n; k++) s += row[k]!;
      means[a] = s / n;
    }
    let acc = 0;
    for (let j = 0; j < filters.length; j++) {
      const f = filters[j]!;
      let bias = 0;
      for (let a = 0; a < c; a++) bias += f[a]! * means[a]!;
      y.fill(-bias);
      for (let a = 0; a < c; a++) {
        const fa = f[a]!;
        if (fa === 0) continue;
        const row = x[a]!;
        for (let k = 0; k < n; k++) y[k]! += fa * row[k]!;
      }
      let q = 0;
      for (let k = 0; k < n; k++) q += y[k]! * y[k]!;
      acc += gains[j]! * (q / n);
    }
    return offset + acc;
  };
}

/**
 * The covariance decision with the tangent-space map (recipes/covariance.ts, map 'log'): the
 * matrix logarithm needs the whole whitened covariance, so this is the stage's own feature
 * function (covarianceFeature) followed by ⟨W, F⟩ + b; no low-rank shortcut.
 */
function logCovarianceDecision(m: CovarianceModel, p: Float64Array[], centre: Float64Array, w: Float64Array): (x: ChannelMajor) => number {
  const r = p.length;
  const c = p[0]?.length ?? 0;
  const feature = new Float64Array(r * r);
  const cov = new Float64Array(c * c);
  const s = new Float64Array(r * r);
  const logWs = createSpdLogWorkspace(r);
  let scratch = new Float64Array(0);
  return (x) => {
    const n = x[0]?.length ?? 0;
    if (scratch.length < c * n) scratch = new Float64Array(c * n);
    covarianceFeature(p, centre, m.scale, x as Float64Array[], feature, 0, cov, s, scratch, logWs);
    let z = m.bias;
    for (let j = 0; j < r * r; j++) z += w[j]! * feature[j]!;
    return z;
  };
}

function checkEpoch(d: LoadedDecoder, data: ChannelMajor, field: string): void {
  const c = d.preprocess.channelNames.length;
  if (data.length !== c) throw new ShapeError(field, `expected ${c} channels (the decoder's order), got ${data.length}`);
  data.forEach((ch, i) => {
    if (ch.length !== d.epochLength) throw new ShapeError(`${field}[${i}]`, `expected ${d.epochLength} samples, got ${ch.length}`);
  });
}

function toPrediction(d: LoadedDecoder, z: number): EpochPrediction {
  const probability = sigmoid(z);
  const classIndex = probability > 0.5 ? 1 : 0;
  return { probability, classIndex, predictedClass: d.classes[classIndex], confidence: classIndex === 1 ? probability : 1 - probability,
           decisionValue: z };
}

/** Prediction for an epoch that was filtered by the decoder's own pre-processing (stream or offline). */
export function predictFilteredEpoch(d: LoadedDecoder, epoch: FilteredEpoch): EpochPrediction {
  if (epoch?.kind !== 'filtered-epoch') throw new ParamError('epoch', `expected a FilteredEpoch (kind 'filtered-epoch'), got ${String((epoch as { kind?: unknown })?.kind)}`);
  checkEpoch(d, epoch.data, 'epoch.data');
  return toPrediction(d, d.decision(epoch.data));
}

/**
 * Prediction for raw samples around a cue: filters the whole segment from a fresh steady state
 * (as a stream starting at the segment's first sample would), then cuts and scores the epoch.
 * Give the segment a run-in before the epoch (a second or more) so the filter has settled.
 */
export function predictRawEpoch(d: LoadedDecoder, segment: RawSegment): EpochPrediction {
  if (segment?.kind !== 'raw-segment') throw new ParamError('segment', `expected a RawSegment (kind 'raw-segment'), got ${String((segment as { kind?: unknown })?.kind)}`);
  const start = segment.cueIndex + d.epochOffset;
  const n = segment.data[0]?.length ?? 0;
  if (!Number.isInteger(segment.cueIndex) || start < 0 || start + d.epochLength > n) {
    throw new ShapeError('segment.cueIndex', `epoch [${start}, ${start + d.epochLength}) does not fit in ${n} samples`);
  }
  const filtered = preprocessContinuous(d.preprocess, segment.data);
  const epoch = filtered.map((ch) => ch.subarray(start, start + d.epochLength));
  return toPrediction(d, d.decision(epoch));
}

/** A stream prediction: the epoch's prediction, its cue and how many samples were filled in. */
export interface StreamPrediction extends EpochPrediction {
  cueSample: number;
  /** Missing samples held over in the epoch or the second before it (online.ts); > 0: flag the trial. */
  filledSamples: number;
}

/** A live stream bound to a decoder: DecoderStream plus one-call prediction. */
export interface DecoderPredictionStream extends DecoderStream {
  /** Prediction for a cue at stream sample `cueSample`, or null until its epoch is complete. */
  predictAt(cueSample: number): StreamPrediction | null;
}

/** Creates the live pre-processing stream for a loaded decoder (online.ts). */
export function createDecoderStream(d: LoadedDecoder, opts: StreamOptions = {}): DecoderPredictionStream {
  const stream = createPreprocessStream(d.preprocess, d.window, opts);
  return {
    get samplesReceived() { return stream.samplesReceived; },
    push: (chunk) => stream.push(chunk),
    epochAt: (cue) => stream.epochAt(cue),
    predictAt(cue) {
      const e = stream.epochAt(cue);
      return e === null ? null : { ...predictFilteredEpoch(d, e), cueSample: cue, filledSamples: e.filledSamples };
    },
  };
}

/** One cue's prediction in a replay. */
export interface PredictedTrial {
  onsetS: number;
  trueClass: string;
  predictedClass: string;
  /** Probability of the predicted class. */
  probability: number;
  /** P of each class, by name. */
  probabilities: Record<string, number>;
  /** Samples filled in for missing data near the epoch (online.ts); > 0 means the trial is suspect. */
  filledSamples: number;
}

/** A replay's result: trials in cue order and the accuracy over them. */
export interface PredictOutput {
  decoder: { recipe: string; sha256: string; classes: string[] };
  trials: PredictedTrial[];
  accuracy: number | null;
  /** Cues whose epoch lies outside the recording. */
  skipped: { onsetS: number; trueClass: string }[];
}

/**
 * Streams `rec` through the decoder in chunks of `chunkS` seconds and predicts at each cue whose
 * annotation text is one of `classes`.
 */
export function predictRecording(decoder: LoadedDecoder, rec: Recording, classes: readonly string[], chunkS = 1): PredictOutput {
  for (const c of classes) {
    if (!decoder.classes.includes(c)) throw new ParamError('classes', `class '${c}' is not one of the decoder's classes (${decoder.classes.join(', ')})`);
  }
  if (rec.sampleRateHz !== decoder.preprocess.sampleRateHz) {
    throw new ShapeError('rec.sampleRateHz', `recording is sampled at ${rec.sampleRateHz} Hz, the decoder expects ${decoder.preprocess.sampleRateHz} Hz`);
  }
  const data = channelsInOrder(rec, decoder.preprocess.channelNames);
  const total = data[0]?.length ?? 0;
  const fs = rec.sampleRateHz;
  const cues = rec.annotations.filter((a) => classes.includes(a.text.trim()))
    .map((a) => ({ onsetS: a.onsetS, trueClass: a.text.trim(), sample: Math.round(a.onsetS * fs) }))
    .sort((a, b) => a.sample - b.sample);
  const stream = createDecoderStream(decoder, { historyS: 60 });
  const trials: PredictedTrial[] = [];
  const skipped: PredictOutput['skipped'] = [];
  const pending = cues.filter((c) => {
    const start = c.sample + decoder.epochOffset;
    const ok = start >= 0 && start + decoder.epochLength <= total;
    if (!ok) skipped.push({ onsetS: c.onsetS, trueClass: c.trueClass });
    return ok;
  });
  const step = Math.max(1, Math.round(chunkS * fs));
  let next = 0;
  for (let s = 0; s < total; s += step) {
    stream.push(data.map((ch) => ch.subarray(s, Math.min(total, s + step))));
    while (next < pending.length) {
      const cue = pending[next]!;
      const p = stream.predictAt(cue.sample);
      if (p === null) break;
      trials.push({ onsetS: cue.onsetS, trueClass: cue.trueClass, predictedClass: p.predictedClass, probability: p.confidence,
                    probabilities: { [decoder.classes[0]]: 1 - p.probability, [decoder.classes[1]]: p.probability },
                    filledSamples: p.filledSamples });
      next++;
    }
  }
  const correct = trials.filter((t) => t.predictedClass === t.trueClass).length;
  return { decoder: { recipe: decoder.artifact.recipe, sha256: decoder.artifact.sha256, classes: [...decoder.classes] },
           trials, accuracy: trials.length > 0 ? correct / trials.length : null, skipped };
}
