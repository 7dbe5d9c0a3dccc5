/**
 * A frozen decoder for the live tests, made by the decoder library itself: `fitDecoder`
 * (shared/decoder/train.ts, no cross-validation) seals the artifact; `loadDecoder` verifies it.
 * Recipe: covariance (Tomioka & Müller 2010) unless a test asks for component-tf.
 */
import { serialiseArtifact, type DecoderArtifact } from '../../../../shared/decoder/artifact';
import type { EpochWindow } from '../../../../shared/decoder/online';
import * as train from '../../../../shared/decoder/train';
import type { Recording } from '../../../../shared/types';
import { liveDecoderFromArtifact } from '../../../../server/live/decoder-loader';
import type { LiveDecoder } from '../../../../server/live/live-decoder';

export interface TrainOptions {
  classes: [string, string];
  window: EpochWindow;
  bandpassHz?: [number, number];
  notchHz?: number | null;
  car?: boolean;
  recipe?: 'covariance' | 'component-tf';
  /** Covariance rank or ICA components. */
  components?: number;
}

/** A trained, sealed decoder: its artifact, the artifact's text as stored, and its live form. */
export interface TrainedDecoder {
  live: LiveDecoder;
  artifact: DecoderArtifact;
  text: string;
}

type Fit = (rec: Recording | readonly Recording[], opts: train.TrainOptions) => DecoderArtifact;

export function trainDecoderWithArtifact(rec: Recording | Recording[], o: TrainOptions): TrainedDecoder {
  const opts: train.TrainOptions = {
    recipe: o.recipe ?? 'covariance', classes: o.classes, tminS: o.window.tminS, tmaxS: o.window.tmaxS, inner: 3, seed: 1,
    ...(o.components !== undefined ? { components: o.components } : {}),
    recipeOptions: { bandpassHz: o.bandpassHz ?? [8, 30], notchHz: o.notchHz ?? null, car: o.car ?? false, lambda: { count: 4 } },
  };
  // The final fit alone when the library offers it (fitDecoder); else the full training with the fewest folds.
  const fit = (train as unknown as { fitDecoder?: Fit }).fitDecoder;
  const artifact = fit ? fit(rec, opts) : train.trainDecoder(rec, { ...opts, folds: 2, baselines: false }).artifact;
  const text = serialiseArtifact(artifact);
  return { artifact, text, live: liveDecoderFromArtifact(JSON.parse(text) as unknown) };
}

export function trainDecoder(rec: Recording | Recording[], o: TrainOptions): LiveDecoder {
  return trainDecoderWithArtifact(rec, o).live;
}
