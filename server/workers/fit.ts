/**
 * The fit of a training job: shared/decoder/train's trainDecoder (nested cross-validation,
 * baselines on the same folds, the final fit, the sealed artifact) with its progress mapped to
 * one fraction and a stage text, then the interpretation.
 */
import { trainDecoder, type TrainProgress } from '../../shared/decoder/train';
import type { Recording } from '../../shared/types';
import { interpretArtifact, readSealedArtifact } from './artifact';
import type { TrainOptions, TrainResult } from './protocol';

/** Share of the bar each phase takes (cross-validation dominates: folds × the final fit's work). */
const PHASES: Record<TrainProgress['phase'], { from: number; to: number; label: string }> = {
  'preprocess': { from: 0, to: 0.05, label: 'pre-processing and epoching' },
  'cross-validation': { from: 0.05, to: 0.8, label: 'nested cross-validation' },
  'baselines': { from: 0.8, to: 0.88, label: 'baselines (CSP + LDA, band power + logistic)' },
  'final': { from: 0.88, to: 1, label: 'final fit on all trials' },
};

/** Progress fraction 0..1 and stage text of a trainer progress event. */
export function describeProgress(p: TrainProgress): { fraction: number; stage: string } {
  const phase = PHASES[p.phase];
  const part = p.total > 0 ? Math.min(1, p.done / p.total) : 0;
  const count = p.phase === 'cross-validation' ? `: outer fold ${Math.min(p.done + 1, p.total)} of ${p.total}` : '';
  return { fraction: phase.from + (phase.to - phase.from) * part, stage: phase.label + count };
}

/**
 * Trains on prepared recordings (study channels in order, class cues labelled with the study's
 * class names) and returns the sealed result. Two classes only: the trace-norm engine is binary.
 */
export function fitDecoder(recordings: Recording[], o: TrainOptions, sourceNames: string[],
                           onProgress: (fraction: number, stage: string) => void): TrainResult {
  if (o.classes.length !== 2) throw new Error(`the decoder engine is binary; the study has ${o.classes.length} classes`);
  const { artifact, report } = trainDecoder(recordings, {
    recipe: o.recipe, classes: [o.classes[0]!, o.classes[1]!], tminS: o.epochStartS, tmaxS: o.epochEndS,
    folds: o.folds, inner: o.inner, seed: o.seed, sourceNames,
    ...(o.components !== undefined ? { components: o.components } : {}),
    ...(o.prior !== undefined ? { prior: o.prior } : {}),
    ...(o.covarianceMap !== undefined ? { recipeOptions: { covarianceMap: o.covarianceMap } } : {}),
  }, (p) => { const d = describeProgress(p); onProgress(d.fraction, d.stage); });
  // Re-read what was sealed, exactly as an import would: the stored text is the canonical form.
  const sealed = readSealedArtifact(JSON.parse(JSON.stringify(artifact)) as unknown);
  const plainReport = JSON.parse(JSON.stringify(report)) as Record<string, unknown>;
  return {
    artifactText: sealed.artifactText, sha256: sealed.sha256, facts: sealed.facts,
    report: plainReport, interpretation: interpretArtifact(sealed.artifact, plainReport),
  };
}
