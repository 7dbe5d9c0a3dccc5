/**
 * The fitted-stage contract (STYLE.md §3) and the pipeline built from it.
 *
 * A `Stage` is a recipe step: a kind and JSON-safe hyperparameters, nothing learned. Its `fit`
 * learns from training trials only and returns a new `Fitted` object; the recipe is never
 * mutated, so one recipe serves every fold. Every stage maps trial i of its input to trial i of
 * its output (same trial count and order). Labels are `Uint8Array` of class indices 0/1 into
 * the study's class list.
 *
 * Self-tuning stages (e.g. a classifier whose `fit` runs its own inner cross-validation over a
 * warm-started lambda path) receive a `FitContext` as the third argument of `fit`: a seed and an
 * inner fold count handed down by the evaluation engine. Such a stage only ever sees the
 * training trials it was given, so its inner search cannot reach the outer test fold. Note that
 * stages before it were fitted on the whole outer training set, so its inner folds share
 * them; for unsupervised upstream stages (ICA, a fixed filter) that is the usual practice, for
 * supervised ones (CSP) use `nestedCrossValidate`, which refits every stage per inner fold.
 */
import { ParamError, ShapeError } from '../types';
import { asRecord } from './stages/artifact-codec';

export {
  asRecord, decodeF64, decodeRows, encodeF64, encodeRows, numberField, type EncodedRows,
} from './stages/artifact-codec';

/** Feature matrix: one row per trial. */
export type FeatureRows = Float64Array[]; // [trial][feature]

/**
 * What the evaluation engine hands to `fit` besides data and labels. A self-tuning stage uses it
 * like this (inside its own `fit(x, labels, ctx)`, on the training trials it was given):
 *   const plan = stratifiedKFold(labels, ctx?.innerK ?? 5, ctx?.seed ?? 0);  // shared/evaluation/folds
 *   for each inner fold: run the warm-started path on take(x, train), score every path point on take(x, test);
 *   pick the point with chooseHyper (shared/evaluation/nested) and refit on all of x.
 */
export interface FitContext {
  /** Seed for anything random inside this fit (inner fold plans, initialisation). */
  readonly seed: number;
  /** Number of inner folds a self-tuning stage should use (default 5 when absent). */
  readonly innerK?: number;
  /** Progress inside this fit, fraction in [0, 1]. */
  readonly onProgress?: (fraction: number) => void;
}

/**
 * A recipe step: hyperparameters only. `fit` learns from training data and returns a new object.
 * `F` lets a stage factory expose its specific fitted type (e.g. `FittedCsp` with its filters).
 */
export interface Stage<In, Out, F extends Fitted<In, Out> = Fitted<In, Out>> {
  readonly kind: string;
  readonly params: Readonly<Record<string, unknown>>;
  fit(x: In, labels?: Uint8Array, ctx?: FitContext): F;
}

/** The result of fitting a stage: applies what was learned to new trials, unchanged. */
export interface Fitted<In, Out> {
  readonly kind: string;
  transform(x: In): Out;
  /** Everything learned plus the params; `fromArtifact` registered for `kind` reverses it. */
  toArtifact(): StageArtifact;
}

/**
 * The last fitted stage of a decoding pipeline. `transform` gives the decision score per trial
 * (a real number on the logit scale, > 0 favours class 1); `predictProba` gives P(class 1).
 */
export interface Classifier<In> extends Fitted<In, Float64Array> {
  predictProba(x: In): Float64Array; // [trial], P(class 1)
}

/** JSON-safe record of a fitted stage; typed arrays are stored with `encodeF64` (base64). */
export type StageArtifact = {
  kind: string;
  version: number;
  params: Record<string, unknown>;
  learned: Record<string, unknown>;
};

/** A saved fitted pipeline: its stages' artifacts in order. */
export type PipelineArtifact = { kind: 'pipeline'; version: 1; stages: StageArtifact[] };

/** Any stage, for heterogeneous lists; the data type between stages is checked at run time. */
export type AnyStage = Stage<unknown, unknown>;
/** Any fitted stage. */
export type AnyFitted = Fitted<unknown, unknown>;

/** True when a fitted stage can give probabilities. */
export function isClassifier(f: AnyFitted): f is Classifier<unknown> {
  return typeof (f as Partial<Classifier<unknown>>).predictProba === 'function';
}

/** A fitted pipeline: every stage fitted in order on the training data. */
export interface FittedPipeline<In> {
  readonly stages: readonly AnyFitted[];
  /** Output of the last stage (decision scores when it is a classifier). */
  transform(x: In): unknown;
  /** P(class 1) per trial; throws ParamError when the last stage is not a classifier. */
  predictProba(x: In): Float64Array;
  /** Class index per trial: 1 when P(class 1) > 0.5, else 0. */
  predict(x: In): Uint8Array;
  toArtifact(): PipelineArtifact;
}

/**
 * Fits the stages in order: stage k is fitted on the training data as transformed by the
 * already fitted stages 0..k-1, with the same labels and context.
 * @param x training trials, `labels[i]` is trial i's class index (0/1)
 */
export function fitPipeline<In>(stages: readonly AnyStage[], x: In, labels: Uint8Array,
                                ctx?: FitContext): FittedPipeline<In> {
  if (stages.length === 0) throw new ParamError('stages', 'expected at least one stage, got none');
  const fitted: AnyFitted[] = [];
  let current: unknown = x;
  for (let k = 0; k < stages.length; k++) {
    const f = stages[k]!.fit(current, labels, ctx);
    fitted.push(f);
    if (k < stages.length - 1) current = f.transform(current);
  }
  return makeFittedPipeline<In>(fitted);
}

function makeFittedPipeline<In>(fitted: readonly AnyFitted[]): FittedPipeline<In> {
  const upTo = (x: In, end: number): unknown => {
    let cur: unknown = x;
    for (let k = 0; k < end; k++) cur = fitted[k]!.transform(cur);
    return cur;
  };
  const last = fitted[fitted.length - 1]!;
  const predictProba = (x: In): Float64Array => {
    if (!isClassifier(last)) {
      throw new ParamError('stages', `last stage must be a classifier, got '${last.kind}'`);
    }
    return last.predictProba(upTo(x, fitted.length - 1));
  };
  return {
    stages: fitted,
    transform: (x) => upTo(x, fitted.length),
    predictProba,
    predict: (x) => Uint8Array.from(predictProba(x), (p) => (p > 0.5 ? 1 : 0)),
    toArtifact: () => ({ kind: 'pipeline', version: 1, stages: fitted.map((f) => f.toArtifact()) }),
  };
}

/** Rebuilds a fitted stage from its artifact (throws ShapeError/ParamError on bad input). */
export type FromArtifact = (artifact: StageArtifact) => AnyFitted;

const registry = new Map<string, FromArtifact>();

/**
 * Registers how to rebuild fitted stages of `kind` from their artifacts. Each stage module
 * registers its own kind when imported; registering a kind twice with a different function
 * throws (two modules claiming one name is a bug).
 */
export function registerStageKind(kind: string, fromArtifact: FromArtifact): void {
  const prev = registry.get(kind);
  if (prev !== undefined && prev !== fromArtifact) {
    throw new ParamError('kind', `stage kind '${kind}' is already registered`);
  }
  registry.set(kind, fromArtifact);
}

/** Kinds registered so far (modules register on import). */
export function registeredStageKinds(): string[] {
  return [...registry.keys()].sort();
}

/** Rebuilds one fitted stage from its (parsed JSON) artifact. */
export function stageFromArtifact(artifact: unknown): AnyFitted {
  const a = parseStageArtifact(artifact, 'artifact');
  const from = registry.get(a.kind);
  if (from === undefined) {
    throw new ParamError('artifact.kind',
      `expected one of [${registeredStageKinds().join(', ')}], got '${a.kind}'`);
  }
  return from(a);
}

/**
 * Rebuilds a fitted pipeline from a saved `PipelineArtifact` (parsed JSON), without the recipe.
 * The modules defining its stage kinds must have been imported (they register themselves).
 */
export function pipelineFromArtifact<In = unknown>(artifact: unknown): FittedPipeline<In> {
  const a = asRecord(artifact, 'artifact');
  if (a.kind !== 'pipeline') throw new ShapeError('artifact.kind', `expected 'pipeline', got ${String(a.kind)}`);
  if (a.version !== 1) throw new ShapeError('artifact.version', `expected 1, got ${String(a.version)}`);
  if (!Array.isArray(a.stages) || a.stages.length === 0) {
    throw new ShapeError('artifact.stages', 'expected a non-empty array');
  }
  return makeFittedPipeline<In>(a.stages.map((s: unknown) => stageFromArtifact(s)));
}

/** Checks the outer shape of a stage artifact. */
export function parseStageArtifact(v: unknown, field: string): StageArtifact {
  const a = asRecord(v, field);
  if (typeof a.kind !== 'string') throw new ShapeError(`${field}.kind`, `expected a string, got ${typeof a.kind}`);
  if (typeof a.version !== 'number') throw new ShapeError(`${field}.version`, `expected a number, got ${typeof a.version}`);
  return { kind: a.kind, version: a.version,
           params: asRecord(a.params, `${field}.params`), learned: asRecord(a.learned, `${field}.learned`) };
}

/** Checks an artifact's kind and version before a stage decodes it. */
export function expectArtifact(a: StageArtifact, kind: string, version: number): void {
  if (a.kind !== kind) throw new ShapeError('artifact.kind', `expected '${kind}', got '${a.kind}'`);
  if (a.version !== version) throw new ShapeError('artifact.version', `expected ${version}, got ${a.version}`);
}

/** The trials at `indices`, in that order (shallow: trials are shared, not copied). */
export function take<T>(data: readonly T[], indices: ArrayLike<number>): T[] {
  const out = new Array<T>(indices.length);
  for (let i = 0; i < indices.length; i++) {
    const j = indices[i]!;
    if (j < 0 || j >= data.length) throw new ShapeError('indices', `index ${j} outside [0, ${data.length})`);
    out[i] = data[j]!;
  }
  return out;
}

/** The labels at `indices`, in that order. */
export function takeLabels(labels: Uint8Array, indices: ArrayLike<number>): Uint8Array {
  const out = new Uint8Array(indices.length);
  for (let i = 0; i < indices.length; i++) {
    const j = indices[i]!;
    if (j < 0 || j >= labels.length) throw new ShapeError('indices', `index ${j} outside [0, ${labels.length})`);
    out[i] = labels[j]!;
  }
  return out;
}

/**
 * Checks that labels are 0/1, one per trial, with both classes present (what any supervised
 * binary fit needs).
 */
export function checkBinaryLabels(labels: Uint8Array | undefined, trials: number, field = 'labels'): Uint8Array {
  if (labels === undefined) throw new ShapeError(field, 'expected class labels for a supervised fit, got none');
  if (labels.length !== trials) throw new ShapeError(field, `expected ${trials} labels, got ${labels.length}`);
  let n1 = 0;
  for (let i = 0; i < labels.length; i++) {
    const l = labels[i]!;
    if (l > 1) throw new ShapeError(`${field}[${i}]`, `expected 0 or 1, got ${l}`);
    n1 += l;
  }
  if (n1 === 0 || n1 === labels.length) {
    throw new ShapeError(field, `expected both classes, got ${labels.length - n1} of class 0 and ${n1} of class 1`);
  }
  return labels;
}
