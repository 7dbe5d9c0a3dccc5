/**
 * From a fitted recipe pipeline to the artifact's model section (artifact.ts): only what
 * prediction needs, and for component-tf only the components with non-zero weights.
 */
import { ShapeError } from '../../types';
import { sealArtifact, type ComponentTfModel, type CovarianceModel, type DecoderArtifact } from '../artifact';
import { epochSamples } from '../online';
import type { RecipePlan } from './index';
import { encodeF64, encodeRows, type FittedPipeline } from '../pipeline';
import type { FittedWhitenedCovariance } from './covariance';
import type { FittedIcaStage } from './ica-stage';
import type { FittedMatrixStandardize } from './matrix-standardize';
import type { MorletFeatureParams, MorletGrid } from './morlet-stage';
import type { FittedTraceNormCv } from './tracenorm-cv';

function stage<T>(fp: FittedPipeline<unknown>, k: number, kind: string): T {
  const s = fp.stages[k];
  if (s === undefined || s.kind !== kind) throw new ShapeError('pipeline', `expected stage ${k} of kind '${kind}', got '${s?.kind}'`);
  return s as T;
}

/** The component-tf model of a fitted [ica, morlet, standardise, trace-norm] pipeline. */
export function componentTfModel(fp: FittedPipeline<unknown>, morlet: MorletFeatureParams, prior: boolean): ComponentTfModel {
  const ica = stage<FittedIcaStage>(fp, 0, 'ica-components');
  const tf = stage<{ grid: MorletGrid }>(fp, 1, 'morlet-logpower');
  const std = stage<FittedMatrixStandardize>(fp, 2, 'matrix-standardize');
  const clf = stage<FittedTraceNormCv>(fp, 3, 'tracenorm-logreg-cv');
  const { model } = clf;
  const selected = model.activeBlocks;
  const F = tf.grid.frequenciesHz.length, T = tf.grid.nBins, size = F * T;
  const pick = (v: Float64Array) => {
    const out = new Float64Array(selected.length * size);
    selected.forEach((k, i) => out.set(v.subarray(k * size, (k + 1) * size), i * size));
    return out;
  };
  const weights = new Float64Array(selected.length * size);
  selected.forEach((k, i) => weights.set(model.weights[k]!, i * size));
  return {
    kind: 'component-tf',
    fittedComponents: ica.ica.unmixing.length,
    selected: [...selected],
    mean: encodeF64(ica.ica.mean),
    unmixing: encodeRows(selected.map((k) => ica.ica.unmixing[k]!)),
    maps: encodeRows(selected.map((k) => Float64Array.from(ica.ica.mixing, (row) => row[k]!))),
    cwt: { frequenciesHz: Array.from(tf.grid.frequenciesHz), cycles: morlet.cycles, binS: morlet.binS, nSamples: morlet.nSamples,
           normalisation: 'unit-energy', padding: 'reflect', lowHz: morlet.lowHz, highHz: morlet.highHz, count: morlet.count },
    featureMean: encodeF64(pick(std.mean)),
    featureScale: encodeF64(pick(std.scale)),
    weights: encodeF64(weights),
    blockShape: { rows: F, cols: T },
    bias: model.bias,
    lambda: model.lambda,
    priorWeights: Array.from(ica.blockWeights),
    plausibility: (ica.plausibility ?? []).map((p) => p.plausibility),
    prior,
  };
}

/** The covariance model of a fitted [whitened-covariance, trace-norm] pipeline. */
export function covarianceModel(fp: FittedPipeline<unknown>): CovarianceModel {
  const cov = stage<FittedWhitenedCovariance>(fp, 0, 'whitened-covariance');
  const clf = stage<FittedTraceNormCv>(fp, 1, 'tracenorm-logreg-cv');
  return {
    kind: 'covariance', whitening: encodeRows(cov.whitening), patternBasis: encodeRows(cov.dewhitening), centre: encodeF64(cov.centre), scale: cov.scale,
    weight: encodeF64(clf.model.weights[0]!), bias: clf.model.bias, lambda: clf.model.lambda, rank: cov.whitening.length,
    ...(cov.map === 'log' ? { map: 'log' as const } : {}),
  };
}

/**
 * Seals the artifact of a recipe plan and its fitted pipeline (artifact.ts), with the given
 * training summary and metrics.
 */
export function assembleArtifact(plan: RecipePlan, fp: FittedPipeline<unknown>, classes: [string, string],
                                 training: Record<string, unknown>, metrics: Record<string, unknown>): DecoderArtifact {
  const fs = plan.preprocess.sampleRateHz;
  const off = epochSamples(plan.window, fs);
  const model = plan.recipe === 'component-tf'
    ? componentTfModel(fp, plan.settings.morlet as MorletFeatureParams, plan.settings.prior as boolean)
    : covarianceModel(fp);
  return sealArtifact({
    format: 'aftercue-decoder', formatVersion: 1, recipe: plan.recipe, classes: [classes[0], classes[1]],
    channelNames: [...plan.preprocess.channelNames], sampleRateHz: fs,
    epoch: { tminS: plan.window.tminS, tmaxS: plan.window.tmaxS, offsetSamples: off.offset, lengthSamples: off.length },
    preprocessing: { bandpass: plan.preprocess.bandpass, notch: plan.preprocess.notch, car: plan.preprocess.car, start: 'steady-state-first-sample' },
    model, training, metrics,
  });
}
