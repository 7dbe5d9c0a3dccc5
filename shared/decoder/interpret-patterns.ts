/**
 * The training-data side of a component-tf decoder's interpretation (interpret.ts module
 * comment): the decoder's decision values on its training epochs, activation patterns over the
 * F×T feature grid, and band patterns over the channels (Haufe et al. 2014, NeuroImage 87:96-110).
 * Everything is recomputed from the artifact alone (unmixing, Morlet log power, z-scoring,
 * weights, as predict.ts applies them), so the numbers describe the frozen decoder exactly.
 */
import { applyUnmixing, type FittedIca } from '../ica/ica';
import { cwt } from '../tf/cwt';
import { createMorletPlan } from '../tf/morlet-plan';
import { ShapeError, type Epochs } from '../types';
import type { ComponentTfModel, DecoderArtifact } from './artifact';
import { decodeF64, decodeRows } from './pipeline';
import { binnedLogPower, morletGrid } from './recipes/morlet-stage';

/** Training epochs for activation patterns: pre-processed as the decoder's training saw them. */
export interface InterpretationTraining {
  epochs: Epochs; // [trial][channel][sample], the decoder's channel order and epoch length
}

/** Per training trial: each selected component's binned Morlet log power and the decision value. */
export interface TrainingFeatures {
  nTrials: number;
  nSelected: number;
  blockSize: number; // F·T
  /** [trial][selected][F·T] log power (component units²). */
  logPower: Float64Array;
  /** [trial] decision value ŷ_i (log-odds of classes[1]). */
  decision: Float64Array;
}

function componentModel(a: DecoderArtifact): ComponentTfModel {
  const m = a.model as ComponentTfModel;
  if (m.kind !== 'component-tf') throw new ShapeError('artifact.model', `expected a component-tf model, got '${String(m.kind)}'`);
  return m;
}

/** The selected components' log-power features and the decision value of every training trial. */
export function trainingFeatures(a: DecoderArtifact, training: InterpretationTraining): TrainingFeatures {
  const m = componentModel(a);
  const { epochs } = training;
  const n = epochs.length;
  if (n < 2) throw new ShapeError('training.epochs', `expected at least 2 trials, got ${n}`);
  const rows = decodeRows(m.unmixing, 'model.unmixing');
  const ica = { mean: decodeF64(m.mean, 'model.mean'), unmixing: rows, mixing: [] } as unknown as FittedIca;
  const grid = morletGrid({ sampleRateHz: a.sampleRateHz, nSamples: m.cwt.nSamples, lowHz: m.cwt.lowHz, highHz: m.cwt.highHz,
                            count: m.cwt.count, cycles: m.cwt.cycles, binS: m.cwt.binS });
  const size = m.blockShape.rows * m.blockShape.cols;
  if (grid.frequenciesHz.length * grid.nBins !== size) throw new ShapeError('model.blockShape', `expected ${grid.frequenciesHz.length}×${grid.nBins}`);
  const K = rows.length;
  const mu = decodeF64(m.featureMean, 'model.featureMean');
  const sd = decodeF64(m.featureScale, 'model.featureScale');
  const w = decodeF64(m.weights, 'model.weights');
  const logPower = new Float64Array(n * K * size);
  const decision = new Float64Array(n);
  const scratch = new Float64Array(grid.frequenciesHz.length * grid.plan.nTimes);
  epochs.forEach((trial, i) => {
    trial.forEach((ch, c) => {
      if (ch.length !== m.cwt.nSamples) throw new ShapeError(`training.epochs[${i}][${c}]`, `expected ${m.cwt.nSamples} samples, got ${ch.length}`);
    });
    let z = m.bias;
    if (K > 0) {
      applyUnmixing(ica, trial).forEach((act, k) => {
        const o = (i * K + k) * size;
        binnedLogPower(grid, act, logPower, o, scratch);
        for (let j = 0; j < size; j++) z += ((logPower[o + j]! - mu[k * size + j]!) / sd[k * size + j]!) * w[k * size + j]!;
      });
    }
    decision[i] = z;
  });
  return { nTrials: n, nSelected: K, blockSize: size, logPower, decision };
}

/** (ŷ_i − ȳ)/Σ_i (ŷ_i − ȳ)², the weights that turn Σ_i weight_i·g_i into Cov(g, ŷ)/Var(ŷ); null when ŷ is constant. */
function decisionWeights(y: Float64Array): Float64Array | null {
  let ym = 0;
  for (const v of y) ym += v / y.length;
  let vy = 0;
  for (const v of y) vy += (v - ym) ** 2;
  return vy > 0 ? y.map((v) => (v - ym) / vy) : null;
}

/**
 * Activation patterns A_k = Cov(x_k, ŷ)/Var(ŷ) of the selected components (interpret.ts module comment).
 * @param space 'power' (default: x = Morlet power) or 'log-power' (x = the log-power features themselves)
 * @returns [selected] F·T row-major patterns, power (or log power) per unit decision value
 */
export function activationPatterns(t: TrainingFeatures, space: 'power' | 'log-power' = 'power'): Float64Array[] {
  const { nTrials: n, nSelected: K, blockSize: size, logPower } = t;
  const dy = decisionWeights(t.decision);
  const value = space === 'power' ? Math.exp : (v: number) => v;
  return Array.from({ length: K }, (_, k) => {
    const pat = new Float64Array(size);
    if (dy === null) return pat;
    for (let i = 0; i < n; i++) {
      const o = (i * K + k) * size;
      // Σ_i (x_i − x̄)·dy_i = Σ_i x_i·dy_i, since Σ_i dy_i = 0.
      for (let j = 0; j < size; j++) pat[j]! += value(logPower[o + j]!) * dy[i]!;
    }
    return pat;
  });
}

/**
 * Band patterns of the selected components (interpret.ts module comment): at frequency f_k, per channel c,
 * a_k[c] = Cov(g_c, ŷ)/Var(ŷ) with g_c,i = mean_t Re(x_c(t)·conj(s_k(t))), x_c the channel's and s_k = w_kᵀx the
 * component's complex Morlet coefficients (the decoder's wavelet: same cycles, unit-energy) on trial i.
 * @param frequenciesHz [selected] f_k, Hz (not finite: that component's pattern is all NaN)
 * @returns [selected][channel]
 */
export function bandPatterns(a: DecoderArtifact, training: InterpretationTraining, t: TrainingFeatures,
                             frequenciesHz: readonly number[]): Float64Array[] {
  const m = componentModel(a);
  const rows = decodeRows(m.unmixing, 'model.unmixing');
  if (frequenciesHz.length !== rows.length) throw new ShapeError('frequenciesHz', `expected ${rows.length} values (one per selected component), got ${frequenciesHz.length}`);
  const C = a.channelNames.length;
  const out = rows.map(() => new Float64Array(C).fill(NaN));
  const dy = decisionWeights(t.decision);
  if (dy === null) return out;
  for (const f of new Set(frequenciesHz.filter((x) => Number.isFinite(x)))) {
    const ks = frequenciesHz.flatMap((x, k) => (x === f ? [k] : []));
    ks.forEach((k) => out[k]!.fill(0));
    const plan = createMorletPlan({ sampleRateHz: a.sampleRateHz, nSamples: m.cwt.nSamples, frequenciesHz: [f], cycles: m.cwt.cycles,
                                    normalisation: 'unit-energy', padding: 'reflect', decimation: 2 });
    training.epochs.forEach((trial, i) => {
      if (trial.length !== C) throw new ShapeError(`training.epochs[${i}]`, `expected ${C} channels, got ${trial.length}`);
      const cs = trial.map((x) => cwt(plan, x));
      const T = cs[0]?.re.length ?? 0;
      for (const k of ks) {
        const w = rows[k]!;
        const sr = new Float64Array(T), si = new Float64Array(T);
        cs.forEach((c, ch) => { for (let j = 0; j < T; j++) { sr[j]! += w[ch]! * c.re[j]!; si[j]! += w[ch]! * c.im[j]!; } });
        cs.forEach((c, ch) => {
          let g = 0;
          for (let j = 0; j < T; j++) g += c.re[j]! * sr[j]! + c.im[j]! * si[j]!;
          out[k]![ch]! += (dy[i]! * g) / T;
        });
      }
    });
  }
  return out;
}
