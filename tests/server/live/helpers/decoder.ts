/**
 * A frozen-decoder stand-in for the live tests: the decoder library's own pieces (pre-processing
 * spec, epoching, a fitted pipeline) trained on a recording. Recipe 'covariance' is the
 * trace-norm covariance recipe (Tomioka & Müller 2010); 'csp-lda' the CSP + shrinkage LDA
 * baseline (Ramoser et al. 2000; Ledoit & Wolf 2004), quicker to fit.
 */
import { cspLdaRecipe } from '../../../../shared/decoder/baselines';
import { epochRecording } from '../../../../shared/decoder/epochs';
import { designPreprocessing, preprocessRecording, type EpochWindow } from '../../../../shared/decoder/online';
import { fitPipeline } from '../../../../shared/decoder/pipeline';
import { covarianceStages } from '../../../../shared/decoder/recipes/covariance';
import type { Recording } from '../../../../shared/types';
import { liveDecoderFromParts, type LiveDecoder } from '../../../../server/live/live-decoder';

export interface TrainOptions {
  classes: [string, string];
  window: EpochWindow;
  bandpassHz?: [number, number];
  notchHz?: number | null;
  car?: boolean;
  recipe?: 'covariance' | 'csp-lda';
  channelNames?: string[];
}

/** A trained decoder: its live form and its artifact (the layout server/live/decoder-loader.ts reads). */
export interface TrainedDecoder {
  live: LiveDecoder;
  artifact: { classes: string[]; preprocess: ReturnType<typeof designPreprocessing>; window: EpochWindow; pipeline: unknown };
}

export function trainDecoder(rec: Recording, o: TrainOptions): LiveDecoder {
  return trainDecoderWithArtifact(rec, o).live;
}

export function trainDecoderWithArtifact(rec: Recording, o: TrainOptions): TrainedDecoder {
  const spec = designPreprocessing({
    sampleRateHz: rec.sampleRateHz, channelNames: o.channelNames ?? rec.channelNames, bandpassHz: o.bandpassHz ?? [8, 30],
    notchHz: o.notchHz ?? null, car: o.car ?? false,
  });
  const filtered = preprocessRecording(spec, rec);
  const { epochs, labels } = epochRecording(filtered, { classes: o.classes }, o.window.tminS, o.window.tmaxS);
  const stages = (o.recipe ?? 'covariance') === 'covariance' ? covarianceStages({ count: 6 }) : cspLdaRecipe(3);
  const pipeline = fitPipeline(stages, epochs, labels, { seed: 1, innerK: 3 });
  return {
    live: liveDecoderFromParts({ classes: o.classes, preprocess: spec, window: o.window, pipeline }),
    artifact: { classes: [...o.classes], preprocess: spec, window: o.window, pipeline: pipeline.toArtifact() },
  };
}
