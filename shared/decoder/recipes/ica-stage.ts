/**
 * The spatial stage of the component-tf recipe: ICA fitted on the training trials only (PCA
 * whitening with rank reduction, then extended Infomax, Lee, Girolami & Sejnowski 1999, or
 * FastICA, Hyvärinen 1999; shared/ica), plus the plausibility prior (prior.ts) scored on the
 * same training trials. Both are label-free; refitted in every outer training fold.
 *
 * ICA input: the training epochs concatenated in time, every `subsample`-th sample (default 2).
 * ICA uses only the joint distribution of the samples, not their order, and after a 40 Hz
 * low-pass at 160 Hz neighbouring samples are strongly correlated, so every second sample
 * carries nearly the same information at half the cost (our choice, for speed).
 * The prior's spectra use all samples of every training epoch.
 */
import { applyUnmixing, fitIca, type FittedIca, type IcaMethod } from '../../ica/ica';
import { ParamError, ShapeError, type Epochs } from '../../types';
import { checkEpochs } from '../epochs';
import { type Fitted, type FitContext, type Stage, encodeRows, encodeF64, registerStageKind, type StageArtifact, expectArtifact, decodeRows, decodeF64 } from '../pipeline';
import { componentSpectrum, scoreComponent, type ComponentPlausibility } from '../prior';

/** Component activations of each trial and their prior weights w_k. */
export interface ComponentTrials {
  activations: Epochs; // [trial][component][sample]
  blockWeights: Float64Array; // [component], w_k (all 1 with the prior off)
}

export type IcaStageParams = {
  nComponents: number;
  method: IcaMethod;
  /** Use the plausibility prior (false: all w_k = 1, scores still computed for the report). */
  prior: boolean;
  channelNames: string[];
  sampleRateHz: number;
  /** Pass band of the pre-processing, Hz: the prior analyses spectra inside it. */
  bandHz: [number, number];
  /** Keep every k-th sample for the ICA fit (default 2; module comment). */
  subsample?: number;
  /**
   * ICA stopping tolerance; default 1e-4 for FastICA (scikit-learn's FastICA default, the same
   * criterion as shared/ica/fastica.ts), the shared/ica default for Infomax.
   */
  tol?: number;
};

/** The fitted ICA stage: the decomposition and each component's plausibility. */
export interface FittedIcaStage extends Fitted<Epochs, ComponentTrials> {
  readonly ica: Pick<FittedIca, 'mean' | 'unmixing' | 'mixing'>;
  readonly plausibility: ComponentPlausibility[] | null; // null when rebuilt from an artifact
  readonly blockWeights: Float64Array;
}

/** Optional instrumentation: seconds spent fitting ICA and transforming to components. */
export interface IcaClock { icaSeconds: number; featureSeconds: number }

/** Stage: ICA + plausibility prior (module comment). */
export function icaStage(params: IcaStageParams, clock?: IcaClock): Stage<Epochs, ComponentTrials> {
  const subsample = params.subsample ?? 2;
  if (!Number.isInteger(subsample) || subsample < 1) throw new ParamError('subsample', `expected an integer >= 1, got ${subsample}`);
  const tol = params.tol ?? (params.method === 'fastica' ? 1e-4 : null);
  const full = { ...params, channelNames: [...params.channelNames], subsample, tol };
  return {
    kind: 'ica-components', params: full,
    fit(x: Epochs, _labels?: Uint8Array, ctx?: FitContext) {
      const { trials, channels, samples } = checkEpochs(x, 'epochs', full.channelNames.length);
      if (trials < 1) throw new ShapeError('epochs', 'expected at least one training trial');
      const t0 = performance.now();
      const per = Math.ceil(samples / subsample);
      const concat = Array.from({ length: channels }, (_, c) => {
        const out = new Float64Array(trials * per);
        x.forEach((trial, i) => { const src = trial[c]!; for (let k = 0, j = 0; k < samples; k += subsample, j++) out[i * per + j] = src[k]!; });
        return out;
      });
      const ica = fitIca(concat, { nComponents: full.nComponents, method: full.method, seed: (ctx?.seed ?? 0) >>> 0,
                                   ...(full.tol === null ? {} : { tol: full.tol }) });
      if (clock) clock.icaSeconds += (performance.now() - t0) / 1000;
      const acts = transformWith(ica, x, clock);
      const band = { lowHz: full.bandHz[0], highHz: full.bandHz[1], sampleRateHz: full.sampleRateHz };
      const plausibility = ica.unmixing.map((_, k) => {
        const map = Float64Array.from(ica.mixing, (row) => row[k]!);
        return scoreComponent(map, full.channelNames, componentSpectrum(acts.map((t) => t[k]!), full.sampleRateHz), band, full.prior);
      });
      return makeFitted(full, ica, plausibility, Float64Array.from(plausibility, (p) => p.weight), clock);
    },
  };
}

function transformWith(ica: Pick<FittedIca, 'mean' | 'unmixing' | 'mixing'>, x: Epochs, clock?: IcaClock): Epochs {
  const t0 = performance.now();
  const out = x.map((trial) => applyUnmixing(ica as FittedIca, trial));
  if (clock) clock.featureSeconds += (performance.now() - t0) / 1000;
  return out;
}

function makeFitted(params: Record<string, unknown>, ica: Pick<FittedIca, 'mean' | 'unmixing' | 'mixing'>,
                    plausibility: ComponentPlausibility[] | null, blockWeights: Float64Array, clock?: IcaClock): FittedIcaStage {
  return {
    kind: 'ica-components', ica, plausibility, blockWeights,
    transform: (x) => {
      checkEpochs(x, 'epochs', ica.mean.length);
      return { activations: transformWith(ica, x, clock), blockWeights };
    },
    toArtifact: () => ({
      kind: 'ica-components', version: 1, params: { ...params },
      learned: { mean: encodeF64(ica.mean), unmixing: encodeRows(ica.unmixing), mixing: encodeRows(ica.mixing), blockWeights: encodeF64(blockWeights) },
    }),
  };
}

/** Rebuilds the fitted stage from its artifact (plausibility details are not kept there). */
export function icaStageFromArtifact(a: StageArtifact): FittedIcaStage {
  expectArtifact(a, 'ica-components', 1);
  const ica = { mean: decodeF64(a.learned.mean, 'learned.mean'), unmixing: decodeRows(a.learned.unmixing, 'learned.unmixing'),
                mixing: decodeRows(a.learned.mixing, 'learned.mixing') };
  return makeFitted(a.params, ica, null, decodeF64(a.learned.blockWeights, 'learned.blockWeights'));
}

registerStageKind('ica-components', icaStageFromArtifact);
