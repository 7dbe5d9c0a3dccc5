/**
 * The two decoding recipes as complete plans: the live pre-processing (online.ts), the epoch
 * window, and the stage list the evaluation engine fits per training fold.
 *
 *   component-tf (interpretable): causal 1-40 Hz Butterworth band-pass (order 4) + CAR; epochs
 *     −0.5..4 s; ICA to 15 components (FastICA; extended Infomax selectable) with the
 *     plausibility prior; Morlet
 *     log power, 16 log-spaced frequencies 4-40 Hz, 7 cycles, 0.25 s bins; per-feature
 *     standardisation; trace-norm logistic regression, one block per component, λ by inner CV
 *     over 10 values from λ_max to λ_max/100 (Tomioka & Müller 2010).
 *   covariance: causal 8-30 Hz band-pass (order 4), no CAR; epochs 0.5..2.5 s; trial
 *     covariance whitened by the training mean covariance over all its directions (the full
 *     C×C form of Tomioka & Müller 2010); trace-norm logistic regression on the single
 *     symmetric block, λ as above.
 * The component-tf defaults follow the outside NumPy implementation quoted in
 * shared/data/eegmmidb/REFERENCE-ACCURACY.md; the covariance band and window are the CSP ones.
 * `components` below the channel count reduces the covariance to that many whitened
 * directions (recipes/covariance.ts), an option for speed only.
 */
import type { IcaMethod } from '../../ica/ica';
import { ParamError } from '../../types';
import type { AnyStage } from '../pipeline';
import { designPreprocessing, epochSamples, type EpochWindow, type PreprocessSpec } from '../online';
import { COVARIANCE_DEFAULTS, whitenedCovarianceStage, type CovarianceMap } from './covariance';
import { icaStage } from './ica-stage';
import { matrixStandardizeStage } from './matrix-standardize';
import { MORLET_DEFAULTS, timedMorletFeatureStage, type MorletFeatureParams } from './morlet-stage';
import { traceNormCvStage, type TraceNormCvParams } from './tracenorm-cv';

export type RecipeName = 'component-tf' | 'covariance';
export const RECIPE_NAMES: readonly RecipeName[] = ['component-tf', 'covariance'];

/** User-facing choices; everything left out takes the recipe's default (module comment). */
export interface RecipeOptions {
  recipe: RecipeName;
  window?: EpochWindow;
  bandpassHz?: [number, number];
  order?: number;
  notchHz?: number | null;
  car?: boolean;
  /** ICA components (component-tf, default 15) or covariance rank (covariance, default: all channels). */
  components?: number;
  /** Directions kept by the covariance rank reduction (recipes/covariance.ts; default 'fluctuation'). */
  covarianceSubspace?: 'variance' | 'fluctuation';
  /** Covariance feature map (recipes/covariance.ts): 'linear' or 'log' (tangent space); default COVARIANCE_DEFAULTS.map. */
  covarianceMap?: CovarianceMap;
  /** Plausibility prior on (default true); component-tf only. */
  prior?: boolean;
  icaMethod?: IcaMethod;
  lambda?: TraceNormCvParams;
  morlet?: Partial<Pick<MorletFeatureParams, 'lowHz' | 'highHz' | 'count' | 'cycles' | 'binS'>>;
}

/** Wall-time accumulators filled while stages run (training report timings). */
export interface TrainingClock { icaSeconds: number; featureSeconds: number; solverSeconds: number }

export function newClock(): TrainingClock {
  return { icaSeconds: 0, featureSeconds: 0, solverSeconds: 0 };
}

/** A recipe resolved for one montage and sampling rate. */
export interface RecipePlan {
  recipe: RecipeName;
  preprocess: PreprocessSpec;
  window: EpochWindow;
  /** Resolved settings (JSON-safe) for reports and artifacts. */
  settings: Record<string, unknown>;
  /** Fresh stages for one fit; timings go to `clock` when given. */
  stages(clock?: TrainingClock): AnyStage[];
}

/** Resolves a recipe for a montage (module comment for the defaults). */
export function planRecipe(opts: RecipeOptions, sampleRateHz: number, channelNames: string[]): RecipePlan {
  if (!RECIPE_NAMES.includes(opts.recipe)) throw new ParamError('recipe', `expected one of ${RECIPE_NAMES.join(', ')}, got ${String(opts.recipe)}`);
  const lambda: TraceNormCvParams = { count: 10, minRatio: 0.01, ...opts.lambda };
  if (opts.recipe === 'covariance') {
    const window = opts.window ?? COVARIANCE_DEFAULTS.window;
    const preprocess = designPreprocessing({ sampleRateHz, channelNames, bandpassHz: opts.bandpassHz ?? COVARIANCE_DEFAULTS.bandpassHz,
                                             order: opts.order ?? COVARIANCE_DEFAULTS.order, notchHz: opts.notchHz ?? null,
                                             car: opts.car ?? COVARIANCE_DEFAULTS.car });
    const rank = Math.min(opts.components ?? channelNames.length, channelNames.length);
    const subspace = opts.covarianceSubspace ?? 'fluctuation';
    const map = opts.covarianceMap ?? COVARIANCE_DEFAULTS.map;
    return {
      recipe: 'covariance', preprocess, window, settings: { rank, subspace, map, lambda },
      stages: (clock) => [whitenedCovarianceStage({ rank, subspace, map }) as AnyStage, traceNormCvStage(lambda, clock) as AnyStage],
    };
  }
  const window = opts.window ?? { tminS: -0.5, tmaxS: 4 };
  const bandpassHz = opts.bandpassHz ?? [1, 40];
  const preprocess = designPreprocessing({ sampleRateHz, channelNames, bandpassHz, order: opts.order ?? 4,
                                           notchHz: opts.notchHz ?? null, car: opts.car ?? true });
  const nComponents = Math.min(opts.components ?? 15, channelNames.length - (preprocess.car ? 1 : 0));
  const method: IcaMethod = opts.icaMethod ?? 'fastica';
  const prior = opts.prior ?? true;
  const morlet: MorletFeatureParams = { ...MORLET_DEFAULTS, ...opts.morlet, sampleRateHz,
                                        nSamples: epochSamples(window, sampleRateHz).length };
  return {
    recipe: 'component-tf', preprocess, window,
    settings: { nComponents, icaMethod: method, prior, morlet, lambda },
    stages: (clock) => [
      icaStage({ nComponents, method, prior, channelNames, sampleRateHz, bandHz: bandpassHz }, clock) as AnyStage,
      timedMorletFeatureStage(morlet, clock ?? newClock()) as AnyStage,
      matrixStandardizeStage() as AnyStage,
      traceNormCvStage(lambda, clock) as AnyStage,
    ],
  };
}
