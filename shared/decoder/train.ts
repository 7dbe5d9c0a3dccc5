/**
 * Training a decoder: the cross-validated estimate, then the frozen decoder.
 *
 * 1. Every recording goes through the live pre-processing path (online.ts: fresh steady state,
 *    one chunk), then epochs are cut at the cues whose annotation text is one of `classes`
 *    (class k = classes[k]) and pooled over recordings.
 * 2. Estimate: repeated stratified outer k-fold (shared/evaluation/folds.ts, seeds
 *    deriveSeed(seed, r)); in each outer training fold the recipe's stages are fitted from
 *    scratch (ICA, prior, standardisation, and the trace-norm classifier whose own inner k-fold
 *    over the λ path picks λ), then the fold's test trials are predicted. Nested CV in the sense
 *    of Varma & Simon 2006; nothing fitted ever sees a test trial.
 * 3. Baselines on the SAME outer folds: CSP (3 pairs) + shrinkage LDA, and log band power
 *    (8-13, 13-30 Hz) + L2 logistic regression with C from an inner 5-fold search over
 *    {0.01, 0.1, 1, 10, 100}; both on causally 8-30 Hz band-passed epochs 0.5-2.5 s after the
 *    cue (the CSP literature's window, REFERENCE-ACCURACY.md; ours filter causally, as live).
 *    Band power is a per-trial transform with nothing learned, so it is computed once.
 * 4. Frozen decoder: the recipe fitted on all trials (its λ again by inner CV), sealed into an
 *    artifact with the report's figures.
 */
import { logBandPower } from './baselines/bandpower';
import { cspStage } from './baselines/csp';
import { logisticStage } from './baselines/logistic';
import { shrinkageLdaStage } from './baselines/shrinkage-lda';
import { crossValidate, type FoldResult } from '../evaluation/cross-validate';
import { deriveSeed, repeatedStratifiedKFold } from '../evaluation/folds';
import { nestedCrossValidate } from '../evaluation/nested';
import { normaliseChannelName } from '../montage';
import { ParamError, ShapeError, type Epochs, type Recording } from '../types';
import type { DecoderArtifact } from './artifact';
import { epochRecording } from './epochs';
import { designPreprocessing, epochSamples, preprocessRecording, type PreprocessSpec } from './online';
import { fitPipeline, type AnyStage } from './pipeline';
import { assembleArtifact } from './recipes/build-model';
import { newClock, planRecipe, type RecipeName, type RecipeOptions, type RecipePlan } from './recipes';
import { cueToCueSeconds, summariseCv, type CvSummary } from './recipes/report';
import { standardizeStage } from './stages/standardize';
import { describeFinalModel, type FinalModelSummary } from './recipes/summary';
import type { FittedTraceNormCv } from './recipes/tracenorm-cv';
import type { MorletFeatureParams } from './recipes/morlet-stage';


/** Options of `trainDecoder`; defaults in brackets. */
export interface TrainOptions {
  recipe: RecipeName;
  /** Annotation texts of the two classes, in label order. */
  classes: [string, string];
  /** Epoch window relative to the cue, s [the recipe's default window]. */
  tminS?: number;
  tmaxS?: number;
  folds?: number; // outer k [10]
  inner?: number; // inner k [5]
  repeats?: number; // [1]
  seed?: number; // [0]
  /** ICA components (component-tf) or covariance rank (covariance) [15 / all channels]. */
  components?: number;
  prior?: boolean; // [true]
  /** Evaluate the two baselines [true]. */
  baselines?: boolean;
  /** File names of the inputs, for the dataset citation (e.g. 'S001R04.edf'). */
  sourceNames?: string[];
  /** Further recipe settings (band, CAR, λ grid, ...). */
  recipeOptions?: Partial<RecipeOptions>;
}

/** Progress: phase and fits done of total in it. */
export interface TrainProgress { phase: 'preprocess' | 'cross-validation' | 'baselines' | 'final'; done: number; total: number }

/** Baseline figures on the recipe's folds. */
export interface BaselineSummary { accuracy: number; foldAccuracies: number[]; repeatAccuracies: number[]; auc: number }

/** REPORT.json (issue 4 part 7), see docs/decoder.md for every field. */
export interface TrainingReport extends FinalModelSummary {
  recipe: RecipeName;
  trials: number;
  trialsPerClass: [number, number];
  classes: [string, string];
  channels: number;
  sampleRateHz: number;
  epochWindowS: [number, number];
  folds: number; inner: number; repeats: number; seed: number;
  nestedCvAccuracy: number;
  wilson95: [number, number];
  chanceThreshold95: number;
  auc: number;
  kappa: number;
  brier: number;
  itrBitsPerTrial: number;
  itrBitsPerMin: number;
  secondsPerTrial: number;
  foldAccuracies: number[];
  repeatAccuracies: number[];
  lambda: { perFold: number[]; perFoldRelative: number[]; final: number; finalRelative: number };
  baselines: { cspLda: BaselineSummary; bandpowerLogreg: BaselineSummary } | null;
  /** Wall and CPU seconds; cv*: the nested cross-validation of the recipe alone (pre-processing included). */
  timings: { totalSeconds: number; cpuSeconds: number | null; cvSeconds: number; cvCpuSeconds: number | null; icaSeconds: number; featureSeconds: number; solverSeconds: number;
             baselineSeconds: number; finalFitSeconds: number };
  settings: Record<string, unknown>;
  citation: string | null;
}

/** Citation of the EEG Motor Movement/Imagery Dataset (its licence asks for both papers). */
export const EEGMMIDB_CITATION = 'EEG Motor Movement/Imagery Dataset (PhysioNet eegmmidb v1.0.0, doi:10.13026/C28G6P): '
  + 'Schalk G, McFarland DJ, Hinterberger T, Birbaumer N, Wolpaw JR. BCI2000: a general-purpose brain-computer interface '
  + '(BCI) system. IEEE Trans Biomed Eng 2004;51(6):1034-1043. Goldberger AL et al. PhysioBank, PhysioToolkit, and '
  + 'PhysioNet. Circulation 2000;101(23):e215-e220. Licence: Open Data Commons Attribution License v1.0.';

/** The citation when every source name looks like an eegmmidb file (SxxxRyy.edf), else null. */
export function datasetCitation(sourceNames: readonly string[]): string | null {
  const base = sourceNames.map((s) => s.split(/[\\/]/).pop() ?? s);
  return base.length > 0 && base.every((b) => /^S\d{3}R\d{2}\.edf$/i.test(b)) ? EEGMMIDB_CITATION : null;
}

interface Trials { epochs: Epochs; labels: Uint8Array; onsets: Float64Array[] }

function epochAll(recs: readonly Recording[], spec: PreprocessSpec, classes: [string, string], tminS: number, tmaxS: number): Trials {
  const epochs: Epochs = [], labels: number[] = [], onsets: Float64Array[] = [];
  for (const rec of recs) {
    const e = epochRecording(preprocessRecording(spec, rec), { classes }, tminS, tmaxS);
    epochs.push(...e.epochs);
    labels.push(...e.labels);
    onsets.push(e.onsetsS);
  }
  return { epochs, labels: Uint8Array.from(labels), onsets };
}

/** Wraps the last stage so each fit's classifier is recorded (λ per fold). */
function recordClassifier(stages: AnyStage[], into: FittedTraceNormCv[]): AnyStage[] {
  const last = stages[stages.length - 1]!;
  const wrapped: AnyStage = { kind: last.kind, params: last.params,
    fit(x, y, ctx) { const f = last.fit(x, y, ctx); into.push(f as unknown as FittedTraceNormCv); return f; } };
  return [...stages.slice(0, -1), wrapped];
}

/** Recordings checked, pre-processed and epoched for a recipe. */
export interface PreparedTraining {
  recs: readonly Recording[];
  sampleRateHz: number;
  channelNames: string[];
  classes: [string, string];
  plan: RecipePlan;
  data: Trials;
  counts: [number, number];
}

/** Step 1 of the module comment: checks, the recipe plan, pre-processing and epochs. */
export function prepareTraining(recordings: Recording | readonly Recording[], opts: TrainOptions): PreparedTraining {
  const recs = Array.isArray(recordings) ? (recordings as readonly Recording[]) : [recordings as Recording];
  if (recs.length === 0) throw new ParamError('recordings', 'expected at least one recording');
  const fs = recs[0]!.sampleRateHz;
  recs.forEach((r, i) => { if (r.sampleRateHz !== fs) throw new ShapeError(`recordings[${i}].sampleRateHz`, `expected ${fs} Hz, got ${r.sampleRateHz} Hz`); });
  const channelNames = recs[0]!.channelNames.map(normaliseChannelName);
  const classes: [string, string] = [opts.classes[0], opts.classes[1]];
  if (classes[0] === classes[1]) throw new ParamError('classes', `expected two different class names, got ${classes[0]} twice`);
  const recipeOpts: RecipeOptions = { ...opts.recipeOptions, recipe: opts.recipe,
    ...(opts.components !== undefined ? { components: opts.components } : {}), ...(opts.prior !== undefined ? { prior: opts.prior } : {}) };
  if (opts.tminS !== undefined || opts.tmaxS !== undefined) {
    if (opts.tminS === undefined || opts.tmaxS === undefined) throw new ParamError('tminS', 'give both tminS and tmaxS, or neither');
    recipeOpts.window = { tminS: opts.tminS, tmaxS: opts.tmaxS };
  }
  const plan = planRecipe(recipeOpts, fs, channelNames);
  const data = epochAll(recs, plan.preprocess, classes, plan.window.tminS, plan.window.tmaxS);
  const counts: [number, number] = [0, 0];
  data.labels.forEach((l) => { counts[l as 0 | 1]++; });
  if (counts[0] < 2 || counts[1] < 2) throw new ShapeError('classes', `expected at least 2 trials of each class, got ${counts[0]} '${classes[0]}' and ${counts[1]} '${classes[1]}'`);
  return { recs, sampleRateHz: fs, channelNames, classes, plan, data, counts };
}

/**
 * The frozen decoder only (step 4 of the module comment, no cross-validation): for a quick
 * later-run check or a re-fit. The artifact's metrics say `crossValidated: false`.
 */
export function fitDecoder(recordings: Recording | readonly Recording[], opts: TrainOptions): DecoderArtifact {
  const p = prepareTraining(recordings, opts);
  const fits: FittedTraceNormCv[] = [];
  const fp = fitPipeline(recordClassifier(p.plan.stages(), fits), p.data.epochs, p.data.labels,
                         { seed: deriveSeed(opts.seed ?? 0, 0x7fff), innerK: opts.inner ?? 5 });
  return assembleArtifact(p.plan, fp as never, p.classes,
    { trials: p.data.labels.length, trialsPerClass: p.counts, lambda: fits[0]!.model.lambda, citation: datasetCitation(opts.sourceNames ?? []) },
    { crossValidated: false });
}

/**
 * Trains a decoder (module comment): nested cross-validation for the estimate, baselines on
 * the same folds, and the final fit on all trials.
 * @param recordings one or more runs with the same channels (matched by 10-10 name) and rate
 * @returns the sealed artifact and the report (the report's figures are inside the artifact too)
 */
export function trainDecoder(recordings: Recording | readonly Recording[], opts: TrainOptions,
                             onProgress?: (p: TrainProgress) => void): { artifact: DecoderArtifact; report: TrainingReport } {
  const t0 = performance.now();
  const cpu0 = cpuSeconds();
  const { folds = 10, inner = 5, repeats = 1, seed = 0 } = opts;
  onProgress?.({ phase: 'preprocess', done: 0, total: 1 });
  const { recs, sampleRateHz: fs, channelNames, classes, plan, data, counts } = prepareTraining(recordings, opts);
  const n = data.labels.length;
  if (folds > Math.min(...counts)) throw new ParamError('folds', `expected at most ${Math.min(...counts)} folds (trials of the smaller class), got ${folds}`);
  onProgress?.({ phase: 'preprocess', done: 1, total: 1 });

  const plans = repeatedStratifiedKFold(data.labels, folds, repeats, seed);
  const clock = newClock();
  const fitted: FittedTraceNormCv[] = [];
  const totalFits = folds * repeats;
  const repeatsFolds: FoldResult[][] = plans.map((p, r) => crossValidate(() => recordClassifier(plan.stages(clock), fitted), data.epochs, data.labels, p, {
    innerK: inner, onProgress: (done) => onProgress?.({ phase: 'cross-validation', done: r * folds + done, total: totalFits }),
  }));
  const cvSeconds = (performance.now() - t0) / 1000;
  const cvCpuSeconds = cpu0 === null ? null : cpuSeconds()! - cpu0;
  const secondsPerTrial = cueToCueSeconds(data.onsets, epochSamples(plan.window, fs).length / fs);
  const cv = summariseCv(repeatsFolds, data.labels, secondsPerTrial);

  const tb = performance.now();
  const baselines = opts.baselines === false ? null : runBaselines(recs, channelNames, classes, data.labels, { folds, inner, repeats, seed },
    (done, total) => onProgress?.({ phase: 'baselines', done, total }));
  const baselineSeconds = (performance.now() - tb) / 1000;

  onProgress?.({ phase: 'final', done: 0, total: 1 });
  const tf = performance.now();
  const finalFits: FittedTraceNormCv[] = [];
  const final = fitPipeline(recordClassifier(plan.stages(clock), finalFits), data.epochs, data.labels, { seed: deriveSeed(seed, 0x7fff), innerK: inner });
  const finalFitSeconds = (performance.now() - tf) / 1000;
  onProgress?.({ phase: 'final', done: 1, total: 1 });
  const finalClf = finalFits[0]!;
  const relative = (f: FittedTraceNormCv) => (f.search ? f.model.lambda / f.search.lambdaMax : NaN);
  const summary = describeFinalModel(final as never, plan.recipe, classes, channelNames, plan.window, fs,
    plan.settings.morlet as MorletFeatureParams | undefined, (plan.settings.prior as boolean | undefined) ?? true, data.epochs);
  const report: TrainingReport = {
    recipe: plan.recipe, trials: n, trialsPerClass: counts, classes, channels: channelNames.length, sampleRateHz: fs,
    epochWindowS: [plan.window.tminS, plan.window.tmaxS], folds, inner, repeats, seed,
    nestedCvAccuracy: cv.accuracy, wilson95: cv.wilson95, chanceThreshold95: cv.chanceThreshold95, auc: cv.auc, kappa: cv.kappa,
    brier: cv.brier, itrBitsPerTrial: cv.itrBitsPerTrial, itrBitsPerMin: cv.itrBitsPerMin, secondsPerTrial,
    foldAccuracies: cv.foldAccuracies, repeatAccuracies: cv.repeatAccuracies,
    lambda: { perFold: fitted.map((f) => f.model.lambda), perFoldRelative: fitted.map(relative),
              final: finalClf.model.lambda, finalRelative: relative(finalClf) },
    ...summary,
    baselines,
    timings: { totalSeconds: (performance.now() - t0) / 1000, cpuSeconds: cpu0 === null ? null : cpuSeconds()! - cpu0,
               cvSeconds, cvCpuSeconds, ...clock, baselineSeconds, finalFitSeconds },
    settings: { ...plan.settings, preprocessing: { bandpassHz: plan.preprocess.bandpass.edgesHz, order: plan.preprocess.bandpass.order,
                notchHz: plan.preprocess.notch?.f0Hz ?? null, car: plan.preprocess.car } },
    citation: datasetCitation(opts.sourceNames ?? []),
  };
  const artifact = assembleArtifact(plan, final as never, classes,
    { trials: n, trialsPerClass: counts, folds, inner, repeats, seed, settings: report.settings, citation: report.citation,
      lambda: report.lambda, rank: report.rank },
    { nestedCvAccuracy: cv.accuracy, wilson95: cv.wilson95, chanceThreshold95: cv.chanceThreshold95, auc: cv.auc, kappa: cv.kappa,
      brier: cv.brier, itrBitsPerMin: cv.itrBitsPerMin, foldAccuracies: cv.foldAccuracies, repeatAccuracies: cv.repeatAccuracies,
      baselines: baselines === null ? null : { cspLda: baselines.cspLda.accuracy, bandpowerLogreg: baselines.bandpowerLogreg.accuracy } });
  return { artifact, report };
}

/** Baselines on the same outer folds (module comment, step 3). */
export function runBaselines(recs: readonly Recording[], channelNames: string[], classes: [string, string], labels: Uint8Array,
                             o: { folds: number; inner: number; repeats: number; seed: number },
                             onProgress?: (done: number, total: number) => void): { cspLda: BaselineSummary; bandpowerLogreg: BaselineSummary } {
  const fs = recs[0]!.sampleRateHz;
  const spec = designPreprocessing({ sampleRateHz: fs, channelNames, bandpassHz: [8, 30], order: 4, car: false });
  const base = epochAll(recs, spec, classes, 0.5, 2.5);
  if (base.labels.length !== labels.length || base.labels.some((l, i) => l !== labels[i])) {
    throw new ShapeError('baselines', 'baseline epochs do not match the recipe trials (a cue window falls outside a recording)');
  }
  const plans = repeatedStratifiedKFold(labels, o.folds, o.repeats, o.seed);
  const total = 2 * o.repeats;
  let done = 0;
  const csp = plans.map((p) => {
    const r = crossValidate(() => [cspStage({ pairs: 3 }) as AnyStage, shrinkageLdaStage() as AnyStage], base.epochs, labels, p);
    onProgress?.(++done, total);
    return r;
  });
  const bp = logBandPower(base.epochs, { sampleRateHz: fs, bandsHz: [[8, 13], [13, 30]] });
  const nested = nestedCrossValidate((C: number) => [standardizeStage() as AnyStage, logisticStage({ C }) as AnyStage],
    [0.01, 0.1, 1, 10, 100], bp, labels, { outerK: o.folds, innerK: o.inner, seed: o.seed, repeats: o.repeats });
  done = total;
  onProgress?.(done, total);
  const cspSummary = summariseCv(csp, labels, 1);
  const byRepeat = plans.map((_, r) => nested.folds.filter((f) => f.repeat === r));
  const bpSummary = summariseCv(byRepeat, labels, 1);
  const pick = (s: CvSummary): BaselineSummary => ({ accuracy: s.accuracy, foldAccuracies: s.foldAccuracies, repeatAccuracies: s.repeatAccuracies, auc: s.auc });
  return { cspLda: pick(cspSummary), bandpowerLogreg: pick(bpSummary) };
}

function cpuSeconds(): number | null {
  const p = (globalThis as { process?: { cpuUsage?: () => { user: number; system: number } } }).process;
  if (p?.cpuUsage === undefined) return null;
  const u = p.cpuUsage();
  return (u.user + u.system) / 1e6;
}
