/**
 * Time-frequency features of the component-tf recipe: complex Morlet CWT log power of each
 * component epoch (Torrence & Compo 1998; n-cycle wavelets, Tallon-Baudry et al. 1997;
 * shared/tf), on a log-spaced frequency grid, averaged into time bins: one F×T matrix per
 * component (Tomioka & Müller 2010 use such a matrix per channel/component).
 *
 * Binning: bins of B = round(binS·fs) samples from the epoch start (T = floor(N/B) bins; a
 * shorter tail is dropped). Inside each bin the power is read every s samples, s the largest
 * power of two with at least 4 readings per bin, at the centres of P = round(B/s) sub-intervals
 * (first reading at sample floor(s/2)); the bin value is ln(mean of the P powers), floored at
 * 1e-20 µV² before the log. Power-of-two reading steps use the exact decimated inverse of
 * shared/tf/cwt.ts. Stateless: nothing is learned (fit returns the stage's transform).
 * Wavelet normalisation 'unit-energy' (power in µV²), 'reflect' padding at the epoch edges.
 */
import { cwtPower } from '../../tf/cwt';
import { logSpacedFrequencies } from '../../tf/frequencies';
import { createMorletPlan, type MorletPlan } from '../../tf/morlet-plan';
import { ParamError, ShapeError } from '../../types';
import { expectArtifact, numberField, registerStageKind, type Fitted, type Stage, type StageArtifact } from '../pipeline';
import type { ComponentTrials } from './ica-stage';
import type { MatrixTrials } from './matrix-trials';

export type MorletFeatureParams = {
  sampleRateHz: number;
  /** Epoch length in samples (every trial must have it). */
  nSamples: number;
  lowHz: number; // default grid 4 Hz
  highHz: number; // 40 Hz
  count: number; // 16 frequencies
  cycles: number; // 7 cycles (Tallon-Baudry et al. 1997 use 7; n >= 6 keeps the wavelet admissible)
  binS: number; // 0.25 s
};

/** Default CWT grid of the component-tf recipe. */
export const MORLET_DEFAULTS = { lowHz: 4, highHz: 40, count: 16, cycles: 7, binS: 0.25 };

/** The resolved grid: frequencies, bins and the plan that computes them. */
export interface MorletGrid {
  frequenciesHz: Float64Array; // [F]
  binSamples: number; // B
  readStep: number; // s
  readsPerBin: number; // P
  nBins: number; // T
  /** Bin centre of each column, s from the epoch start (add tminS for time from the cue). */
  binCentresS: Float64Array; // [T]
  plan: MorletPlan;
}

/** Resolves the grid and builds its plan (module comment). */
export function morletGrid(p: MorletFeatureParams): MorletGrid {
  const fs = p.sampleRateHz;
  const binSamples = Math.round(p.binS * fs);
  if (!(binSamples >= 1)) throw new ParamError('binS', `expected at least one sample per bin, got ${p.binS} s at ${fs} Hz`);
  const nBins = Math.floor(p.nSamples / binSamples);
  if (nBins < 1) throw new ParamError('nSamples', `expected at least one ${binSamples}-sample bin, got ${p.nSamples} samples`);
  let readStep = 1;
  while (readStep * 2 * 4 <= binSamples) readStep *= 2;
  const readsPerBin = Math.max(1, Math.round(binSamples / readStep));
  const frequenciesHz = logSpacedFrequencies(p.lowHz, p.highHz, p.count);
  // One uniform reading grid of step s from floor(s/2) over the binned span; each reading goes to
  // the bin holding its sample (when B = P·s, as at 160 Hz, every bin gets exactly P readings).
  const first = Math.floor(readStep / 2);
  const count = Math.floor((nBins * binSamples - 1 - first) / readStep) + 1;
  const plan = createMorletPlan({
    sampleRateHz: fs, nSamples: p.nSamples, frequenciesHz, cycles: p.cycles,
    normalisation: 'unit-energy', padding: 'reflect', decimation: { firstSample: first, step: readStep, count },
  });
  const binCentresS = Float64Array.from({ length: nBins }, (_, b) => (b * binSamples + binSamples / 2) / fs);
  return { frequenciesHz, binSamples, readStep, readsPerBin, nBins, binCentresS, plan };
}

/**
 * Log binned power of one signal into `out` (F×T row-major, frequency-major).
 * @param scratch [F·plan.nTimes] buffer for the power readings
 */
export function binnedLogPower(grid: MorletGrid, x: Float64Array, out: Float64Array, outOffset: number, scratch: Float64Array): void {
  const { plan, nBins, binSamples } = grid;
  const nT = plan.nTimes;
  cwtPower(plan, x, scratch);
  const samples = plan.outputSamples;
  const F = plan.nFrequencies;
  for (let f = 0; f < F; f++) {
    const row = f * nT;
    let col = 0;
    for (let b = 0; b < nBins; b++) {
      const end = (b + 1) * binSamples;
      let acc = 0, n = 0;
      while (col < nT && samples[col]! < end) { acc += scratch[row + col]!; n++; col++; }
      out[outOffset + f * nBins + b] = Math.log(Math.max(n > 0 ? acc / n : 0, 1e-20));
    }
  }
}

/** Stage: one F×T log-power block per component (stateless; module comment). */
export function morletFeatureStage(params: MorletFeatureParams): Stage<ComponentTrials, MatrixTrials> {
  const full = { ...params };
  const grid = morletGrid(full);
  const fitted = makeFitted(full, grid);
  return { kind: 'morlet-logpower', params: full, fit: () => fitted };
}

/** Optional instrumentation: seconds spent computing features. */
export interface FeatureClock { featureSeconds: number }

function makeFitted(params: MorletFeatureParams, grid: MorletGrid, clock?: FeatureClock): Fitted<ComponentTrials, MatrixTrials> & { grid: MorletGrid } {
  const F = grid.frequenciesHz.length, T = grid.nBins;
  return {
    kind: 'morlet-logpower', grid,
    transform(x) {
      const t0 = performance.now();
      const n = x.activations.length;
      const comps = x.activations[0]?.length ?? x.blockWeights.length;
      const out = new Float64Array(n * comps * F * T);
      const scratch = new Float64Array(F * grid.plan.nTimes);
      x.activations.forEach((trial, i) => {
        if (trial.length !== comps) throw new ShapeError(`activations[${i}]`, `expected ${comps} components, got ${trial.length}`);
        trial.forEach((s, k) => binnedLogPower(grid, s, out, (i * comps + k) * F * T, scratch));
      });
      if (clock) clock.featureSeconds += (performance.now() - t0) / 1000;
      return { features: { nTrials: n, blocks: Array.from({ length: comps }, () => ({ rows: F, cols: T })), x: out },
               blockWeights: x.blockWeights };
    },
    toArtifact: () => ({ kind: 'morlet-logpower', version: 1, params: { ...params }, learned: {} }),
  };
}

/** Stage with feature timing (for training reports). */
export function timedMorletFeatureStage(params: MorletFeatureParams, clock: FeatureClock): Stage<ComponentTrials, MatrixTrials> {
  const full = { ...params };
  const fitted = makeFitted(full, morletGrid(full), clock);
  return { kind: 'morlet-logpower', params: full, fit: () => fitted };
}

/** Rebuilds the stage from its artifact. */
export function morletFeatureFromArtifact(a: StageArtifact): Fitted<ComponentTrials, MatrixTrials> {
  expectArtifact(a, 'morlet-logpower', 1);
  const f = (k: string) => numberField(a.params, k, 'params');
  return morletFeatureStage({ sampleRateHz: f('sampleRateHz'), nSamples: f('nSamples'), lowHz: f('lowHz'), highHz: f('highHz'),
                              count: f('count'), cycles: f('cycles'), binS: f('binS') }).fit({ activations: [], blockWeights: new Float64Array(0) });
}

registerStageKind('morlet-logpower', morletFeatureFromArtifact);
