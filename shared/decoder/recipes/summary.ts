/**
 * The final model's part of a training report: rank, the selected components with their prior
 * scores and rank-1 peaks (component-tf), or the discriminative spatial patterns (covariance),
 * and the plausibility of every ICA component so the prior is visible (prior.ts).
 */
import type { DecoderArtifact } from '../artifact';
import { interpretDecoder, spatialPatterns } from '../interpret';
import type { EpochWindow } from '../online';
import type { FittedPipeline } from '../pipeline';
import type { ComponentPlausibility } from '../prior';
import { componentTfModel, covarianceModel } from './build-model';
import type { FittedIcaStage } from './ica-stage';
import type { MorletFeatureParams } from './morlet-stage';
import type { FittedTraceNormCv } from './tracenorm-cv';

/** One component the final decoder uses. */
export interface SelectedComponent {
  index: number;
  weightNorm: number; // ‖W_k‖_F
  rank: number;
  plausibility: number;
  priorWeight: number;
  peakFrequencyHz: number; // argmax |u_1|
  peakTimeS: number; // argmax |v_1|, bin centre from the cue
  subScores: ComponentPlausibility['subScores'] | null;
}

/** Report fields that describe the final model. */
export interface FinalModelSummary {
  /** Sum of the ranks of the non-zero weight blocks. */
  rank: number;
  selectedComponents?: SelectedComponent[];
  /** Every ICA component's plausibility (the prior as applied), component-tf only. */
  componentPlausibility?: (ComponentPlausibility & { index: number })[];
  spatialPatterns?: { eigenvalue: number; favours: string; pattern: number[]; filter: number[] }[];
  patternChannels?: string[];
}

/** Builds the summary from the final fitted pipeline (module comment). */
export function describeFinalModel(fp: FittedPipeline<unknown>, recipe: 'component-tf' | 'covariance', classes: [string, string],
                                   channelNames: string[], window: EpochWindow, sampleRateHz: number,
                                   morlet?: MorletFeatureParams, prior = true): FinalModelSummary {
  const clf = fp.stages[fp.stages.length - 1] as unknown as FittedTraceNormCv;
  const rank = clf.model.activeBlocks.reduce((s, k) => s + clf.model.ranks[k]!, 0);
  const shell = { classes, channelNames, sampleRateHz, epoch: { tminS: window.tminS, tmaxS: window.tmaxS, offsetSamples: 0, lengthSamples: 0 } };
  if (recipe === 'covariance') {
    const a = { ...shell, model: covarianceModel(fp) } as unknown as DecoderArtifact;
    return { rank, patternChannels: [...channelNames],
             spatialPatterns: spatialPatterns(a).map((p) => ({ eigenvalue: p.eigenvalue, favours: p.favours, pattern: p.pattern, filter: p.filter })) };
  }
  const ica = fp.stages[0] as unknown as FittedIcaStage;
  const a = { ...shell, model: componentTfModel(fp, morlet!, prior) } as unknown as DecoderArtifact;
  const interp = interpretDecoder(a, 1);
  const comps = interp.recipe === 'component-tf' ? interp.components : [];
  return {
    rank,
    selectedComponents: comps.map((c) => ({
      index: c.component, weightNorm: c.weightNorm, rank: clf.model.ranks[c.component]!,
      plausibility: ica.plausibility?.[c.component]?.plausibility ?? NaN, priorWeight: c.priorWeight,
      peakFrequencyHz: c.peakFrequencyHz, peakTimeS: c.peakTimeS, subScores: ica.plausibility?.[c.component]?.subScores ?? null,
    })).sort((x, y) => y.weightNorm - x.weightNorm),
    componentPlausibility: (ica.plausibility ?? []).map((p, index) => ({ index, ...p })),
  };
}
