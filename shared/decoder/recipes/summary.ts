/**
 * The final model's part of a training report: rank, the selected components with their prior
 * scores and rank-1 peaks (component-tf), or the discriminative spatial patterns (covariance),
 * and the plausibility of every ICA component so the prior is visible (prior.ts).
 *
 * Peaks of a selected component: given the training epochs, `peakFrequencyHz` and `peakTimeS`
 * are those of its activation pattern (Haufe et al. 2014, NeuroImage 87:96-110; interpret.ts),
 * where the component's log power changes with the decision; the weights' own peaks (a filter)
 * stay in `weightPeakFrequencyHz` / `weightPeakTimeS`. Without training epochs both are the weights'.
 */
import type { DecoderArtifact } from '../artifact';
import { interpretDecoder, spatialPatterns } from '../interpret';
import type { EpochWindow } from '../online';
import type { FittedPipeline } from '../pipeline';
import type { Epochs } from '../../types';
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
  /** argmax |u_1| of the activation pattern (of W_k without training epochs; `peakSource`), Hz. */
  peakFrequencyHz: number;
  /** argmax |v_1| of the same, bin centre, s from the cue. */
  peakTimeS: number;
  peakSource: 'activation-pattern' | 'weights';
  /** argmax |u_1|, |v_1| of the weights W_k (a filter, module comment). */
  weightPeakFrequencyHz: number;
  weightPeakTimeS: number;
  /** The leading frequency profile and time course behind peakFrequencyHz / peakTimeS. */
  frequencyProfile: number[];
  timeCourse: number[];
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

/**
 * Builds the summary from the final fitted pipeline (module comment).
 * @param trainingEpochs the final fit's training epochs (pre-processed, [trial][channel][sample]): adds the
 *   activation-pattern peaks; omit for the weights' peaks only
 */
export function describeFinalModel(fp: FittedPipeline<unknown>, recipe: 'component-tf' | 'covariance', classes: [string, string],
                                   channelNames: string[], window: EpochWindow, sampleRateHz: number,
                                   morlet?: MorletFeatureParams, prior = true, trainingEpochs?: Epochs): FinalModelSummary {
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
  const interp = interpretDecoder(a, 1, trainingEpochs === undefined ? undefined : { epochs: trainingEpochs });
  const comps = interp.recipe === 'component-tf' ? interp.components : [];
  return {
    rank,
    selectedComponents: comps.map((c) => ({
      index: c.component, weightNorm: c.weightNorm, rank: clf.model.ranks[c.component]!,
      plausibility: ica.plausibility?.[c.component]?.plausibility ?? NaN, priorWeight: c.priorWeight,
      peakFrequencyHz: c.peakFrequencyHz, peakTimeS: c.peakTimeS, peakSource: c.profileSource,
      weightPeakFrequencyHz: c.weightPeakFrequencyHz, weightPeakTimeS: c.weightPeakTimeS,
      frequencyProfile: c.frequencyProfile, timeCourse: c.timeCourse, subScores: ica.plausibility?.[c.component]?.subScores ?? null,
    })).sort((x, y) => y.weightNorm - x.weightNorm),
    componentPlausibility: (ica.plausibility ?? []).map((p, index) => ({ index, ...p })),
  };
}
