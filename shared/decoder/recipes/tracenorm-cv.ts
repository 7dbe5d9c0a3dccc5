/**
 * Trace-norm logistic regression (Tomioka & Aihara 2007; Tomioka & Müller 2010) whose λ is
 * chosen by an inner cross-validation over a warm-started λ path, run inside `fit` on the
 * training trials it was given and nothing else (Varma & Simon 2006, BMC Bioinformatics 7:91;
 * Cawley & Talbot 2010, JMLR 11:2079-2107). Because the evaluation engine only ever calls `fit`
 * on an outer training fold, the inner search never sees that fold's test trials.
 *
 * Grid: `count` values λ_j = λ_max · minRatio^(j/(count−1)), λ_max computed exactly on the
 * training trials with their block weights (tracenorm.ts), so the first value gives the all-zero
 * model. The same grid serves every inner fold (as glmnet's cross-validation does: Friedman,
 * Hastie & Tibshirani 2010, J Stat Softw 33(1)), each inner fold fitting the whole path with
 * warm starts. Score per λ: pooled inner accuracy, ties broken by pooled log-loss, remaining
 * ties by the larger λ (`chooseHyper` of shared/evaluation/nested.ts), or log-loss first with
 * selectBy 'logLoss'. The final model is the path on all training trials down to the chosen λ.
 * Inner plan: stratified k-fold with the seed from the FitContext (k = ctx.innerK, default 5,
 * reduced to the minority class count when that is smaller).
 */
import { stratifiedKFold } from '../../evaluation/folds';
import { logLoss } from '../../evaluation/metrics';
import { chooseHyper, type InnerScore, type SelectBy } from '../../evaluation/nested';
import { ParamError } from '../../types';
import {
  checkBinaryLabels, decodeF64, encodeF64, expectArtifact, numberField, registerStageKind,
  type Classifier, type FitContext, type Stage, type StageArtifact,
} from '../pipeline';
import { decisionFunction, lambdaMax, type TraceNormModel } from '../tracenorm';
import { sigmoid } from '../tracenorm-data';
import { traceNormPath } from '../tracenorm-path';
import { checkMatrixTrials, subsetTrials, type MatrixTrials } from './matrix-trials';

/** Hyperparameters of the λ search. */
export type TraceNormCvParams = {
  /** Number of λ values on the path (default 10). */
  count?: number;
  /** Smallest λ as a fraction of λ_max (default 0.01, i.e. λ_max/100). */
  minRatio?: number;
  /** Inner ranking criterion (default 'accuracy'). */
  selectBy?: SelectBy;
  /**
   * Solver relative tolerance (default 1e-4; tracenorm-fista.ts stopping rule) and iteration cap
   * (default 3000). 1e-4 is ample for classification: the λ grid itself is a factor 1.67 apart.
   */
  tol?: number;
  maxIter?: number;
};

type Full = Required<TraceNormCvParams>;

/** What the λ search learned, besides the final model. */
export interface LambdaSearch {
  lambdaMax: number;
  lambdas: Float64Array; // [count], decreasing
  innerScores: InnerScore[]; // [count]
  chosenIndex: number;
  innerK: number;
}

/** The fitted classifier: the final model and the record of its λ search. */
export interface FittedTraceNormCv extends Classifier<MatrixTrials> {
  readonly model: TraceNormModel;
  readonly search: LambdaSearch | null; // null when rebuilt from an artifact
}

/** Optional instrumentation: seconds spent in the solver are added to `solverSeconds`. */
export interface SolverClock { solverSeconds: number }

function withDefaults(p: TraceNormCvParams): Full {
  const full: Full = { count: p.count ?? 10, minRatio: p.minRatio ?? 0.01, selectBy: p.selectBy ?? 'accuracy',
                       tol: p.tol ?? 1e-4, maxIter: p.maxIter ?? 3000 };
  if (!Number.isInteger(full.count) || full.count < 1) throw new ParamError('count', `expected an integer >= 1, got ${full.count}`);
  if (!(full.minRatio > 0 && full.minRatio <= 1)) throw new ParamError('minRatio', `expected a value in (0, 1], got ${full.minRatio}`);
  if (full.selectBy !== 'accuracy' && full.selectBy !== 'logLoss') throw new ParamError('selectBy', `expected 'accuracy' or 'logLoss', got ${String(full.selectBy)}`);
  return full;
}

/**
 * Stage: trace-norm logistic regression with λ chosen by inner CV (module comment).
 * @param clock optional accumulator of solver wall time (for training reports)
 */
export function traceNormCvStage(params: TraceNormCvParams = {}, clock?: SolverClock): Stage<MatrixTrials, Float64Array> {
  const full = withDefaults(params);
  return {
    kind: 'tracenorm-logreg-cv', params: full,
    fit(x, labels, ctx) {
      checkMatrixTrials(x);
      const y = checkBinaryLabels(labels, x.features.nTrials);
      const t0 = performance.now();
      const { model, search } = searchLambda(x, y, full, ctx);
      if (clock) clock.solverSeconds += (performance.now() - t0) / 1000;
      return makeFitted(full, model, search);
    },
  };
}

/** Runs the inner search and the final fit (module comment). */
export function searchLambda(x: MatrixTrials, y: Uint8Array, p: Full, ctx?: FitContext): { model: TraceNormModel; search: LambdaSearch } {
  const bw = x.blockWeights;
  const lamMax = lambdaMax(x.features, y, bw);
  const lambdas = Float64Array.from({ length: p.count }, (_, j) => (p.count === 1 ? lamMax : lamMax * p.minRatio ** (j / (p.count - 1))));
  const solver = { tol: p.tol, maxIter: p.maxIter, blockWeights: bw };
  let ones = 0;
  for (const v of y) ones += v;
  const innerK = Math.min(ctx?.innerK ?? 5, ones, y.length - ones);
  let chosenIndex = 0;
  let innerScores: InnerScore[] = [];
  if (p.count > 1 && innerK >= 2) {
    const plan = stratifiedKFold(y, innerK, ctx?.seed ?? 0);
    const correct = new Float64Array(p.count);
    const loss = new Float64Array(p.count);
    plan.folds.forEach(({ train, test }) => {
      const path = traceNormPath(subsetTrials(x, train).features, Uint8Array.from(train, (i) => y[i]!), { lambdas, ...solver });
      const testX = subsetTrials(x, test).features;
      const testY = Uint8Array.from(test, (i) => y[i]!);
      path.models.forEach((m, j) => {
        const prob = decisionFunction(m, testX).map(sigmoid);
        for (let i = 0; i < test.length; i++) if ((prob[i]! > 0.5 ? 1 : 0) === testY[i]) correct[j]!++;
        loss[j]! += logLoss(testY, prob) * test.length;
      });
    });
    innerScores = Array.from(lambdas, (_, j) => ({ accuracy: correct[j]! / y.length, logLoss: loss[j]! / y.length }));
    chosenIndex = chooseHyper(innerScores, p.selectBy);
  }
  const final = traceNormPath(x.features, y, { lambdas: lambdas.slice(0, chosenIndex + 1), ...solver });
  const model = final.models[final.models.length - 1]!;
  return { model, search: { lambdaMax: lamMax, lambdas, innerScores, chosenIndex, innerK } };
}

function makeFitted(p: Full, model: TraceNormModel, search: LambdaSearch | null): FittedTraceNormCv {
  const score = (x: MatrixTrials) => { checkMatrixTrials(x); return decisionFunction(model, x.features); };
  return {
    kind: 'tracenorm-logreg-cv', model, search,
    transform: score,
    predictProba: (x) => score(x).map(sigmoid),
    toArtifact: () => ({
      kind: 'tracenorm-logreg-cv', version: 1, params: { ...p },
      learned: {
        blocks: model.blocks.map((b) => ({ rows: b.rows, cols: b.cols })),
        weights: model.weights.map((w) => encodeF64(w)),
        bias: model.bias, lambda: model.lambda, blockWeights: encodeF64(model.blockWeights),
        ranks: model.ranks, activeBlocks: model.activeBlocks,
      },
    }),
  };
}

/** Rebuilds the fitted classifier from its stage artifact (weights, bias, λ; no search record). */
export function traceNormCvFromArtifact(a: StageArtifact): FittedTraceNormCv {
  expectArtifact(a, 'tracenorm-logreg-cv', 1);
  const p = withDefaults(a.params as TraceNormCvParams);
  const blocks = a.learned.blocks;
  const weights = a.learned.weights;
  if (!Array.isArray(blocks) || !Array.isArray(weights) || blocks.length !== weights.length) {
    throw new ParamError('learned.blocks', 'expected equal-length arrays of blocks and weights');
  }
  const shapes = blocks.map((b: unknown, k) => {
    const r = b as Record<string, unknown>;
    return { rows: numberField(r, 'rows', `learned.blocks[${k}]`), cols: numberField(r, 'cols', `learned.blocks[${k}]`) };
  });
  const w = weights.map((v: unknown, k) => decodeF64(v, `learned.weights[${k}]`));
  const ranks = Array.isArray(a.learned.ranks) ? (a.learned.ranks as number[]) : shapes.map(() => 0);
  const model: TraceNormModel = {
    blocks: shapes, weights: w, bias: numberField(a.learned, 'bias', 'learned'), lambda: numberField(a.learned, 'lambda', 'learned'),
    alpha: 0, blockWeights: decodeF64(a.learned.blockWeights, 'learned.blockWeights'), iterations: 0, converged: true,
    objective: NaN, ranks, activeBlocks: w.flatMap((wk, k) => (wk.some((v) => v !== 0) ? [k] : [])), lipschitz: 0,
  };
  return makeFitted(p, model, null);
}

registerStageKind('tracenorm-logreg-cv', traceNormCvFromArtifact);
