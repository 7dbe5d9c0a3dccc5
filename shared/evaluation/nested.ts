/**
 * Nested cross-validation (Varma & Simon 2006, BMC Bioinformatics 7:91; Cawley & Talbot 2010,
 * JMLR 11:2079-2107): the outer folds estimate accuracy; inside each outer training set an
 * inner stratified k-fold picks the hyperparameters, then the recipe with those
 * hyperparameters is refitted on the whole outer training set and scores the outer test fold.
 * Inner folds are drawn from outer training indices only, and every stage (filters, ICA, CSP,
 * scalers, classifier) is refitted in every inner and outer fit.
 */
import type { AnyStage } from '../decoder/pipeline';
import { ParamError, ShapeError } from '../types';
import { runFold, type FoldResult } from './cross-validate';
import { deriveSeed, repeatedStratifiedKFold, stratifiedKFold } from './folds';
import { logLoss } from './metrics';

/** How inner folds rank hyperparameters. */
export type SelectBy = 'accuracy' | 'logLoss';

/** Progress of a nested run: fits done out of all fits (inner and outer). */
export interface CvProgress {
  done: number;
  total: number;
  repeat: number;
  fold: number;
  phase: 'inner' | 'outer';
}

export interface NestedCvOptions {
  outerK?: number; // default 10
  innerK?: number; // default 5
  seed?: number; // default 0
  repeats?: number; // default 1
  /** Ranking criterion (default 'accuracy'); see `chooseHyper` for ties. */
  selectBy?: SelectBy;
  onProgress?: (p: CvProgress) => void;
}

/** Pooled inner-CV scores of one grid entry on one outer training set. */
export interface InnerScore {
  accuracy: number; // correct / inner test trials, pooled over inner folds
  logLoss: number; // mean over inner test trials, natural log
}

/** One outer fold of one repeat. */
export interface NestedFoldResult<H> extends FoldResult {
  repeat: number;
  chosen: H;
  chosenIndex: number;
  /** One per grid entry (empty when the grid has one entry and no inner CV ran). */
  innerScores: InnerScore[];
}

/** One repeat's outer folds pooled: a probability and prediction for every trial. */
export interface RepeatResult {
  seed: number;
  probabilities: Float64Array; // [trial], P(class 1) from the fold that tested it
  predictions: Uint8Array; // [trial]
  accuracy: number; // pooled over all trials
  foldAccuracies: number[];
}

export interface NestedCvResult<H> {
  folds: NestedFoldResult<H>[];
  repeats: RepeatResult[];
  repeatAccuracies: number[];
  /** Mean of the repeats' pooled accuracies: the estimate to report. */
  accuracy: number;
}

/**
 * Picks a grid entry from inner scores. Primary: highest pooled accuracy (or lowest log-loss
 * with selectBy 'logLoss'); ties within 1e-12 go to the better secondary score (log-loss, or
 * accuracy); remaining ties to the EARLIEST grid entry. So list the grid from the strongest
 * regularisation to the weakest, and ties choose the simpler model.
 */
export function chooseHyper(scores: readonly InnerScore[], selectBy: SelectBy = 'accuracy'): number {
  const key = (s: InnerScore): [number, number] =>
    selectBy === 'accuracy' ? [s.accuracy, -s.logLoss] : [-s.logLoss, s.accuracy];
  let best = 0;
  for (let g = 1; g < scores.length; g++) {
    const [a1, a2] = key(scores[g]!), [b1, b2] = key(scores[best]!);
    if (a1 > b1 + 1e-12 || (Math.abs(a1 - b1) <= 1e-12 && a2 > b2 + 1e-12)) best = g;
  }
  return best;
}

/**
 * Repeated nested cross-validation of a recipe family over a hyperparameter grid.
 * Outer plan of repeat r: stratifiedKFold(labels, outerK, deriveSeed(seed, r)); inner plan of its
 * fold f: stratifiedKFold(outer-training labels, innerK, deriveSeed(seed, r, f)).
 * @param makeRecipe builds the stages for one hyperparameter value (called per fit)
 * @param grid candidate hyperparameters; one entry skips the inner CV
 */
export function nestedCrossValidate<T, H>(makeRecipe: (hyper: H) => readonly AnyStage[],
                                          grid: readonly H[], data: readonly T[], labels: Uint8Array,
                                          opts: NestedCvOptions = {}): NestedCvResult<H> {
  const { outerK = 10, innerK = 5, seed = 0, repeats = 1, selectBy = 'accuracy', onProgress } = opts;
  if (grid.length === 0) throw new ParamError('grid', 'expected at least one hyperparameter value, got none');
  if (data.length !== labels.length) {
    throw new ShapeError('labels', `expected ${data.length} labels (one per trial), got ${labels.length}`);
  }
  const plans = repeatedStratifiedKFold(labels, outerK, repeats, seed);
  const fitsPerFold = grid.length > 1 ? grid.length * innerK + 1 : 1;
  const total = repeats * outerK * fitsPerFold;
  let done = 0;
  const folds: NestedFoldResult<H>[] = [];
  const repeatResults: RepeatResult[] = [];

  plans.forEach((plan, r) => {
    const n = labels.length;
    const probabilities = new Float64Array(n).fill(NaN);
    const predictions = new Uint8Array(n);
    let correct = 0;
    const foldAccuracies: number[] = [];
    plan.folds.forEach(({ train, test }, f) => {
      const innerScores = grid.length > 1
        ? innerSearch(makeRecipe, grid, data, labels, train, innerK, deriveSeed(seed, r, f), () => {
          onProgress?.({ done: ++done, total, repeat: r, fold: f, phase: 'inner' });
        })
        : [];
      const chosenIndex = grid.length > 1 ? chooseHyper(innerScores, selectBy) : 0;
      const chosen = grid[chosenIndex]!;
      const res = runFold(() => makeRecipe(chosen), data, labels, train, test, f,
                          { seed: deriveSeed(seed, r, f, 1), innerK });
      onProgress?.({ done: ++done, total, repeat: r, fold: f, phase: 'outer' });
      res.test.forEach((i, j) => { probabilities[i] = res.probabilities[j]!; predictions[i] = res.predictions[j]!; });
      correct += res.correct;
      foldAccuracies.push(res.accuracy);
      folds.push({ ...res, repeat: r, chosen, chosenIndex, innerScores });
    });
    repeatResults.push({ seed: plan.seed, probabilities, predictions, accuracy: correct / n, foldAccuracies });
  });
  const repeatAccuracies = repeatResults.map((x) => x.accuracy);
  return { folds, repeats: repeatResults, repeatAccuracies,
           accuracy: repeatAccuracies.reduce((a, b) => a + b, 0) / repeatAccuracies.length };
}

/** Inner CV on the outer training indices only; returns pooled scores per grid entry. */
function innerSearch<T, H>(makeRecipe: (hyper: H) => readonly AnyStage[], grid: readonly H[],
                           data: readonly T[], labels: Uint8Array, outerTrain: Int32Array,
                           innerK: number, innerSeed: number, tick: () => void): InnerScore[] {
  const trainLabels = Uint8Array.from(outerTrain, (i) => labels[i]!);
  const plan = stratifiedKFold(trainLabels, innerK, innerSeed);
  return grid.map((hyper) => {
    let correct = 0, count = 0, lossSum = 0;
    plan.folds.forEach(({ train, test }, f) => {
      // Map inner positions back to trial indices of the full data set (all inside outerTrain).
      const res = runFold(() => makeRecipe(hyper), data, labels, remap(outerTrain, train),
                          remap(outerTrain, test), f, { seed: deriveSeed(innerSeed, f), innerK });
      const y = Uint8Array.from(res.test, (i) => labels[i]!);
      correct += res.correct;
      count += res.test.length;
      lossSum += logLoss(y, res.probabilities) * res.test.length;
      tick();
    });
    return { accuracy: correct / count, logLoss: lossSum / count };
  });
}

function remap(outer: Int32Array, positions: Int32Array): Int32Array {
  return Int32Array.from(positions, (p) => outer[p]!);
}
