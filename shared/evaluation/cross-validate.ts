/**
 * Cross-validation over a recipe (never a fitted model): each fold fits a fresh pipeline on its
 * training trials only and scores its test trials. Varma & Simon 2006 (BMC Bioinformatics
 * 7:91) and Kriegeskorte et al. 2009 (Nat Neurosci 12(5):535-540) explain why every
 * data-dependent step must sit inside the fold; taking a recipe makes that the only way.
 */
import {
  fitPipeline, take, takeLabels, type AnyStage, type FitContext,
} from '../decoder/pipeline';
import { ShapeError } from '../types';
import { checkFoldPlan, deriveSeed, type FoldPlan } from './folds';

/** Stages to fit per fold, or a function making them (called once per fit). */
export type Recipe = readonly AnyStage[] | (() => readonly AnyStage[]);

/** What one fold produced; arrays are in the order of `test`. */
export interface FoldResult {
  fold: number;
  train: Int32Array;
  test: Int32Array;
  probabilities: Float64Array; // [test trial], P(class 1)
  predictions: Uint8Array; // [test trial], 1 when P(class 1) > 0.5
  correct: number;
  accuracy: number;
  /** Wall time of fitting plus predicting this fold, seconds. */
  seconds: number;
}

/** Options shared by the cross-validation functions. */
export interface CvOptions {
  /** Called after each fitted fold with (done, total). */
  onProgress?: (done: number, total: number) => void;
  /** Inner fold count handed to self-tuning stages through FitContext (default 5). */
  innerK?: number;
}

/** Resolves a recipe to its stage list. */
export function recipeStages(recipe: Recipe): readonly AnyStage[] {
  return typeof recipe === 'function' ? recipe() : recipe;
}

/**
 * Fits `recipe` on one fold's training trials and scores its test trials. The only place in
 * the evaluation engine where `fit` is called: test trials reach the fitted pipeline through
 * `predictProba` alone.
 */
export function runFold<T>(recipe: Recipe, data: readonly T[], labels: Uint8Array,
                           train: Int32Array, test: Int32Array, fold: number,
                           ctx: FitContext): FoldResult {
  const t0 = now();
  const fitted = fitPipeline<T[]>(recipeStages(recipe), take(data, train), takeLabels(labels, train), ctx);
  const probabilities = fitted.predictProba(take(data, test));
  if (probabilities.length !== test.length) {
    throw new ShapeError('predictProba', `expected ${test.length} probabilities, got ${probabilities.length}`);
  }
  const predictions = new Uint8Array(test.length);
  let correct = 0;
  for (let i = 0; i < test.length; i++) {
    predictions[i] = probabilities[i]! > 0.5 ? 1 : 0;
    if (predictions[i] === labels[test[i]!]) correct++;
  }
  return { fold, train, test, probabilities, predictions, correct,
           accuracy: test.length > 0 ? correct / test.length : NaN, seconds: (now() - t0) / 1000 };
}

/**
 * k-fold cross-validation of a recipe on one fold plan.
 * @param data trials (Epochs, feature rows, ...), indexed like `labels`
 * @param labels class index 0/1 per trial
 * @returns one result per fold, in plan order. Fold f's stages get FitContext
 *   { seed: deriveSeed(plan.seed, f), innerK }.
 */
export function crossValidate<T>(recipe: Recipe, data: readonly T[], labels: Uint8Array,
                                 plan: FoldPlan, opts: CvOptions = {}): FoldResult[] {
  if (data.length !== labels.length) {
    throw new ShapeError('labels', `expected ${data.length} labels (one per trial), got ${labels.length}`);
  }
  checkFoldPlan(plan, data.length);
  const innerK = opts.innerK ?? 5;
  return plan.folds.map(({ train, test }, f) => {
    const r = runFold(recipe, data, labels, train, test, f, { seed: deriveSeed(plan.seed, f), innerK });
    opts.onProgress?.(f + 1, plan.folds.length);
    return r;
  });
}

/** Per-trial probabilities and predictions assembled from folds (NaN/255 where untested). */
export interface Pooled {
  probabilities: Float64Array; // [trial]
  predictions: Uint8Array; // [trial], 255 when the trial was in no test fold
  correct: number;
  tested: number;
  accuracy: number; // correct / tested
}

/** Pools fold results into per-trial arrays and the pooled accuracy. */
export function poolFolds(results: readonly FoldResult[], labels: Uint8Array): Pooled {
  const n = labels.length;
  const probabilities = new Float64Array(n).fill(NaN);
  const predictions = new Uint8Array(n).fill(255);
  let correct = 0, tested = 0;
  for (const r of results) {
    r.test.forEach((i, j) => {
      probabilities[i] = r.probabilities[j]!;
      predictions[i] = r.predictions[j]!;
      tested++;
      if (r.predictions[j] === labels[i]) correct++;
    });
  }
  return { probabilities, predictions, correct, tested, accuracy: tested > 0 ? correct / tested : NaN };
}

function now(): number {
  return typeof performance !== 'undefined' ? performance.now() : Date.now();
}
