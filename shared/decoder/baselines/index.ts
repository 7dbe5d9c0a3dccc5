/**
 * The two baselines reported beside every decoder (DESIGN.md, The decoder §7), as recipes for
 * the evaluation engine, plus their stages. Importing this module registers every baseline and
 * generic stage kind for `pipelineFromArtifact`.
 */
import type { AnyStage } from '../pipeline';
import { standardizeStage } from '../stages/standardize';
import { bandPowerStage } from './bandpower';
import { cspStage } from './csp';
import { logisticStage } from './logistic';
import { shrinkageLdaStage } from './shrinkage-lda';

export * from './bandpower';
export * from './csp';
export * from './logistic';
export * from './shrinkage-lda';
export { bandpassStage, filterRecording, bandpassSos, type BandpassParams } from '../stages/bandpass';
export { standardizeStage, type FittedStandardize } from '../stages/standardize';
export { selectKBestStage, anovaF, type FittedSelectKBest, type SelectKBestParams } from '../stages/select-k-best';

/**
 * CSP + shrinkage LDA (Ramoser et al. 2000; Ledoit & Wolf 2004) on epochs that are already
 * band-passed (filterRecording before epoching, or put bandpassStage first). No hyperparameter
 * is tuned: use `crossValidate`.
 */
export function cspLdaRecipe(pairs = 3): AnyStage[] {
  return [cspStage({ pairs }), shrinkageLdaStage({ shrinkage: 'auto' })];
}

/** C grid for the band-power baseline, strongest penalty first (ties pick the simpler model). */
export const LOGISTIC_C_GRID: readonly number[] = [0.01, 0.1, 1, 10, 100];

/**
 * Log band power + z-scoring + L2 logistic regression, for one C. Tune C with
 * `nestedCrossValidate((C) => bandPowerLogregRecipe(C, { sampleRateHz }), LOGISTIC_C_GRID, ...)`.
 * The band-power stage is label-free, so `logBandPower` may equally be computed once before
 * cross-validation (much faster) and the recipe started at the scaler.
 */
export function bandPowerLogregRecipe(C: number, bands: { sampleRateHz: number; bandsHz?: [number, number][] }): AnyStage[] {
  return [bandPowerStage(bands), standardizeStage(), logisticStage({ C })];
}
