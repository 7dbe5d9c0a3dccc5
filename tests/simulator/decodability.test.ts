// Decodability (issue 5 part 6): the component-tf recipe, trained on a simulated calibration run,
// must rest on the components that carry the profile's effects, at the profile's frequency and
// after its onset, and must leave blink and muscle components out. Everything is judged against
// the simulator's ground truth. Scenario: tests/fixtures/simulator/decodability-hand-imagery.json
// (ours; measured figures and other seeds in docs/decodability.md).
import { beforeAll, describe, expect, it } from 'vitest';
import { interpretDecoder, type ComponentInterpretation } from '../../shared/decoder/interpret';
import { fitPipeline } from '../../shared/decoder/pipeline';
import { assembleArtifact } from '../../shared/decoder/recipes/build-model';
import type { FittedIcaStage } from '../../shared/decoder/recipes/ica-stage';
import { binnedLogPower, MORLET_DEFAULTS, morletGrid } from '../../shared/decoder/recipes/morlet-stage';
import { prepareTraining } from '../../shared/decoder/train';
import { crossValidate, poolFolds } from '../../shared/evaluation/cross-validate';
import { deriveSeed, stratifiedKFold } from '../../shared/evaluation/folds';
import { chanceThreshold } from '../../shared/evaluation/stats';
import { simulateRecording, type GroundTruth, type TruthEffect } from '../../simulator';
import { expectClose } from '../helpers/all-close';
import { CLASSES, energyShareInside, pattern, pearson, PROFILE, SIM_SEED } from './truth-helpers';

const SEED = 0; // trainDecoder's default seed
const INNER_K = 3;

interface ComponentTruth { index: number; rBlink: number; rMuscle: number; blinkShare: number; muscleShare: number }

let truth: GroundTruth;
let trials: number;
let cvAccuracy: number;
let selected: ComponentInterpretation[];
let components: ComponentTruth[];
let channelNames: string[];
/** Per selected component: class-mean log power over the effects' plateau per CWT frequency. */
let classLogPower: Map<number, { frequenciesHz: Float64Array; logPower: [Float64Array, Float64Array] }>;

beforeAll(() => {
  const sim = simulateRecording(PROFILE, SIM_SEED === undefined ? {} : { seed: SIM_SEED });
  truth = sim.truth;
  // What trainDecoder does (shared/decoder/train.ts), with the pipeline kept so every ICA component can be inspected:
  // the live pre-processing and epochs, a nested 5-fold cross-validation (λ by inner 3-fold CV inside each outer
  // training fold), and the final fit on all trials with the seed trainDecoder uses (deriveSeed(seed, 0x7fff)).
  const p = prepareTraining(sim.recording, { recipe: 'component-tf', classes: CLASSES, seed: SEED, inner: INNER_K });
  trials = p.data.labels.length;
  const folds = crossValidate(() => p.plan.stages(), p.data.epochs, p.data.labels, stratifiedKFold(p.data.labels, 5, SEED), { innerK: INNER_K });
  cvAccuracy = poolFolds(folds, p.data.labels).accuracy;
  const fp = fitPipeline(p.plan.stages(), p.data.epochs, p.data.labels, { seed: deriveSeed(SEED, 0x7fff), innerK: INNER_K });
  const artifact = assembleArtifact(p.plan, fp, CLASSES, { trials }, { crossValidated: false });
  const interp = interpretDecoder(artifact, 1, { epochs: p.data.epochs });
  if (interp.recipe !== 'component-tf') throw new Error('expected a component-tf decoder');
  selected = interp.components;
  channelNames = artifact.channelNames;

  const ica = fp.stages[0] as unknown as FittedIcaStage;
  const fs = p.sampleRateHz;
  const acts = ica.transform(p.data.epochs).activations;
  const offset = Math.round(p.plan.window.tminS * fs);
  components = ica.ica.unmixing.map((_, k) => {
    const map = ica.ica.mixing.map((row) => row[k]!);
    const a = acts.map((trial) => trial[k]!);
    return {
      index: k,
      rBlink: Math.abs(pearson(map, pattern(truth, 'eye-vertical'))),
      rMuscle: Math.max(Math.abs(pearson(map, pattern(truth, 'muscle-left'))), Math.abs(pearson(map, pattern(truth, 'muscle-right')))),
      blinkShare: energyShareInside(truth, ['blink'], a, p.data.onsets[0]!, offset, fs),
      muscleShare: energyShareInside(truth, ['muscle'], a, p.data.onsets[0]!, offset, fs),
    };
  });

  // Class-mean Morlet log power of each selected component over the effects' plateau, on the recipe's CWT grid.
  const grid = morletGrid({ ...MORLET_DEFAULTS, sampleRateHz: fs, nSamples: p.data.epochs[0]![0]!.length });
  const F = grid.frequenciesHz.length, T = grid.nBins;
  const e0 = truth.effects[0]!;
  const plateau = Array.from(grid.binCentresS, (t, b) => [t + p.plan.window.tminS, b] as const)
    .filter(([t]) => t > e0.onsetS + e0.rampS && t < e0.onsetS + e0.durationS - e0.rampS).map(([, b]) => b);
  classLogPower = new Map(selected.map((c) => {
    const logPower: [Float64Array, Float64Array] = [new Float64Array(F), new Float64Array(F)];
    const counts = [0, 0];
    const out = new Float64Array(F * T), scratch = new Float64Array(F * grid.plan.nTimes);
    acts.forEach((trial, i) => {
      const y = p.data.labels[i]! as 0 | 1;
      binnedLogPower(grid, trial[c.component]!, out, 0, scratch);
      counts[y]!++;
      for (let f = 0; f < F; f++) for (const b of plateau) logPower[y][f]! += out[f * T + b]! / plateau.length;
    });
    logPower.forEach((row, y) => row.forEach((_, f) => { row[f]! /= counts[y]!; }));
    return [c.component, { frequenciesHz: grid.frequenciesHz, logPower }] as const;
  }));
  console.info(describeRun());
}, 600_000);

/**
 * The selected component that best matches an effect's source (largest |r|): by its band pattern (interpret.ts
 * bandMap: the channels' cross-spectra with the component at its activation pattern's peak frequency, against the
 * decision value: the source whose band power the decoder reads through the component) or by its ICA map (the mixing
 * column, the component's broadband pattern).
 */
function effectComponent(e: TruthEffect, by: 'band' | 'mixing' = 'band'): { c: ComponentInterpretation; r: number } {
  const src = pattern(truth, e.sourceId);
  return selected.map((c) => ({ c, r: pearson(by === 'band' ? c.bandMap! : c.map, src) }))
    .sort((x, y) => Math.abs(y.r) - Math.abs(x.r))[0]!;
}

function mean(v: number[]): number {
  return v.reduce((s, x) => s + x, 0) / v.length;
}

/** Mean |time course| before the onset and on the effect's plateau (ramps excluded). */
function timeCourseBeforeAfter(c: ComponentInterpretation, e: TruthEffect): { before: number; after: number } {
  const before = c.timesS.flatMap((t, j) => (t < e.onsetS ? [Math.abs(c.timeCourse[j]!)] : []));
  const after = c.timesS.flatMap((t, j) => (t > e.onsetS + e.rampS && t < e.onsetS + e.durationS - e.rampS ? [Math.abs(c.timeCourse[j]!)] : []));
  return { before: mean(before), after: mean(after) };
}

/**
 * The effect class's power change against the other class over the plateau, per frequency, as the ratio of
 * geometric-mean powers minus 1, in % (negative = ERD; Pfurtscheller & Lopes da Silva 1999 define ERD% with a
 * reference interval; the other class in the same window is ours: it has no effect at this source, and log-power
 * means keep a few muscle bursts from dominating). Returns the frequency of the largest change in the effect's
 * direction.
 */
function changePeakHz(c: ComponentInterpretation, e: TruthEffect): { peakHz: number; changePercent: number[] } {
  const cp = classLogPower.get(c.component)!;
  const k = CLASSES.indexOf(e.class);
  const changePercent = Array.from(cp.frequenciesHz, (_, f) => 100 * (Math.exp(cp.logPower[k]![f]! - cp.logPower[1 - k]![f]!) - 1));
  const sign = Math.sign(e.changePercent);
  const best = changePercent.reduce((b, v, f) => (sign * v > sign * changePercent[b]! ? f : b), 0);
  return { peakHz: cp.frequenciesHz[best]!, changePercent };
}

function weightShare(c: ComponentInterpretation): number {
  return c.weightNorm ** 2 / selected.reduce((s, x) => s + x.weightNorm ** 2, 0);
}

function describeRun(): string {
  const lines = [`trials ${trials}, nested 5-fold accuracy ${cvAccuracy.toFixed(3)}, selected ${selected.map((c) => c.component).join(', ')}`];
  for (const e of truth.effects) {
    const { c, r } = effectComponent(e);
    const mix = effectComponent(e, 'mixing');
    const tc = timeCourseBeforeAfter(c, e);
    lines.push(`effect ${e.index} (${e.class}, ${e.nearChannel}, ${e.frequencyHz} Hz): component ${c.component} band-pattern r ${r.toFixed(3)} ` +
      `at ${c.bandMapFrequencyHz.toFixed(2)} Hz (best ICA map: component ${mix.c.component}, r ${mix.r.toFixed(3)}), pattern peak ${c.peakFrequencyHz.toFixed(2)} Hz at ${c.peakTimeS.toFixed(2)} s (weights ${c.weightPeakFrequencyHz.toFixed(2)} Hz at ${c.weightPeakTimeS.toFixed(2)} s), ` +
      `|time course| before ${tc.before.toFixed(3)} after ${tc.after.toFixed(3)}, weight share ${weightShare(c).toFixed(2)}, ` +
      `class power change largest at ${changePeakHz(c, e).peakHz.toFixed(2)} Hz (${changePeakHz(c, e).changePercent.map((v) => v.toFixed(0)).join(' ')})`);
    lines.push(`  pattern time course ${c.timeCourse.map((v, j) => `${c.timesS[j]!.toFixed(2)}:${v.toFixed(2)}`).join(' ')}`);
    lines.push(`  pattern frequency profile ${c.frequencyProfile.map((v, j) => `${c.frequenciesHz[j]!.toFixed(1)}:${v.toFixed(2)}`).join(' ')}`);
  }
  for (const c of selected) {
    lines.push(`selected ${c.component}: weight share ${weightShare(c).toFixed(2)}, plausibility ${(c.plausibility ?? NaN).toFixed(3)}, ` +
      `band-pattern |r| with the effect sources ${truth.effects.map((e) => Math.abs(pearson(c.bandMap!, pattern(truth, e.sourceId))).toFixed(2)).join(' / ')}, ` +
      `ICA map ${truth.effects.map((e) => Math.abs(pearson(c.map, pattern(truth, e.sourceId))).toFixed(2)).join(' / ')}`);
  }
  for (const k of components) {
    lines.push(`component ${k.index}${selected.some((c) => c.component === k.index) ? ' (selected)' : ''}: |r| blink ${k.rBlink.toFixed(2)} muscle ${k.rMuscle.toFixed(2)}, ` +
      `energy share in blinks ${k.blinkShare.toFixed(2)}, in muscle bursts ${k.muscleShare.toFixed(2)}`);
  }
  return lines.join('\n');
}

// Known failures: checks the decoder does not meet at the fixture's seed (measured values in each comment and in
// docs/decodability.md). They run as expected failures, so the suite stays green and turns red the day one starts to
// pass (then make it a plain check). With AFTERCUE_DECODABILITY_SEED set every check runs plainly (the doc's table).
const knownFailure = SIM_SEED === undefined ? it.fails : it;

describe('decodability of a simulated hand-imagery calibration (component-tf recipe)', () => {
  it('uses the scenario the test is written for', () => {
    // Source: the profile (tests/fixtures/simulator/decodability-hand-imagery.json): 40 trials per class, two mu ERD effects.
    expect(trials).toBe(80);
    expect(truth.effects.map((e) => [e.class, e.nearChannel])).toEqual([['left-hand', 'C4'], ['right-hand', 'C3']]);
  });

  const mapCheck = (i: number, by: 'band' | 'mixing') => {
    const { r } = effectComponent(truth.effects[i]!, by);
    // Source: ground truth (the effect's sourceId and its scalp pattern); |r| >= 0.8 is our bar for "the same map".
    expect(Math.abs(r)).toBeGreaterThanOrEqual(0.8);
  };
  // The band pattern (interpret.ts bandMap, after Haufe et al. 2014): |r| 0.962 (C4, at 10.05 Hz) and 0.971 (C3, at
  // 11.71 Hz) at the fixture's seed.
  it.each([0, 1])('selects a component whose band pattern is the source of effect %i', (i) => mapCheck(i, 'band'));
  // Known failure at the fixture's seed: the best-matching selected ICA map (mixing column, the broadband pattern) has
  // |r| = 0.741 with the C4 mu source. The simulator's rhythms are stationary Gaussian processes, which ICA
  // (non-Gaussianity) cannot isolate: within the Gaussian subspace its rotation is arbitrary, so the C4 mu component
  // comes out mixed with pink background sources (broadband) while its 11.7 Hz activity is the mu source's (band pattern
  // above). The 15-dimensional PCA subspace holds both mu patterns (|r| 1.000 for their projections) and component 2 is the
  // best of all 15 (docs/decodability.md).
  knownFailure('selects a component whose ICA map is the source of effect 0 (C4, left-hand) [known failure]', () => mapCheck(0, 'mixing'));
  it('selects a component whose ICA map is the source of effect 1 (C3, right-hand)', () => mapCheck(1, 'mixing'));

  it.each([0, 1])('gives effect %i its component on the hemisphere opposite the imagined hand, with the sign of an ERD', (i) => {
    const e = truth.effects[i]!;
    const { c } = effectComponent(e);
    const at = (ch: string) => Math.abs(c.bandMap![channelNames.indexOf(ch)]!);
    const other = e.nearChannel === 'C4' ? 'C3' : 'C4';
    // Source: Pfurtscheller & Lopes da Silva 1999 (mu ERD is contralateral: left-hand imagery -> C4); the profile places it so.
    expect(at(e.nearChannel)).toBeGreaterThan(at(other));
    // Summed weight on the component's log power over the ERD plateau: P(right-hand) rises with C4 power (left-hand
    // imagery lowers it) and falls with C3 power. Source: Pfurtscheller & Lopes da Silva 1999 (ERD = power decrease);
    // ground truth (changePercent -50, class order left-hand, right-hand).
    const plateau = c.timesS.flatMap((t, j) => (t > e.onsetS + e.rampS && t < e.onsetS + e.durationS - e.rampS ? [j] : []));
    const sum = c.weights.reduce((s, row) => s + plateau.reduce((a, j) => a + row[j]!, 0), 0);
    expect(Math.sign(sum)).toBe(e.class === 'left-hand' ? 1 : -1);
  });

  // peakFrequencyHz is the activation pattern's (interpret.ts; Haufe et al. 2014, NeuroImage 87:96-110, in power):
  // 10.05 Hz (C4) and 11.71 Hz (C3) at the fixture's seed. The weights' own u_1 (weightPeakFrequencyHz, a filter, not a
  // pattern) peaks at 13.66 Hz for both: they follow single-trial signal-to-noise, not where the power changes.
  it.each([0, 1])('finds effect %i at the profile\'s frequency (within 1.5 Hz)', (i) => {
    const e = truth.effects[i]!;
    const { c } = effectComponent(e);
    // Source: interpret.ts reads the peak from the activation pattern when given the training epochs.
    expect(c.profileSource).toBe('activation-pattern');
    // Source: issue 5 part 6 (peak frequency within 1.5 Hz of the profile's); the profile's frequencyHz.
    expectClose(c.peakFrequencyHz, e.frequencyHz, { atol: 1.5, rtol: 0 });
  });

  it.each([0, 1])('selects, for effect %i, a component whose power changes most at the profile\'s frequency', (i) => {
    const e = truth.effects[i]!;
    const { c } = effectComponent(e);
    // Source: the profile's frequencyHz; the power change as in changePeakHz (after Pfurtscheller & Lopes da Silva
    // 1999); 1.5 Hz as in issue 5 part 6.
    expectClose(changePeakHz(c, e).peakHz, e.frequencyHz, { atol: 1.5, rtol: 0 });
  });

  it.each([0, 1])('gives effect %i a time course that changes after the profile\'s onset', (i) => {
    const e = truth.effects[i]!;
    const { c } = effectComponent(e);
    const { before, after } = timeCourseBeforeAfter(c, e);
    // Source: issue 5 part 6 (time course changing after the onset); ground truth onsetS, rampS, durationS.
    // Factor 2: our bar for "clearly" (the mean |v_1| on the plateau at least twice that before the onset).
    expect(after).toBeGreaterThan(2 * before);
    // Source: ground truth effect window [onsetS, onsetS + durationS].
    expect(c.peakTimeS).toBeGreaterThan(e.onsetS);
    expect(c.peakTimeS).toBeLessThan(e.onsetS + e.durationS);
  });

  // Carriers by band pattern (as effectComponent): at the fixture's seed components 2 and 6, all the weight.
  it('rests mainly on the effects\' components', () => {
    const carriers = new Set(truth.effects.map((e) => effectComponent(e)).filter(({ r }) => Math.abs(r) >= 0.8).map(({ c }) => c.component));
    const share = selected.filter((c) => carriers.has(c.component)).reduce((s, c) => s + weightShare(c), 0);
    // Source: ground truth (effect sources); "mainly" = at least half of sum_k ||W_k||_F^2 is our bar.
    expect(share).toBeGreaterThanOrEqual(0.5);
  });

  it('leaves blink components out (and there are some to leave out)', () => {
    // A blink component: its map is the truth's vertical-EOG pattern (|r| >= 0.9), or a third of its energy lies inside
    // the truth's blink windows. Source: ground truth (eye-vertical pattern, blink times); thresholds ours.
    const blinks = components.filter((k) => k.rBlink >= 0.9 || k.blinkShare >= 1 / 3).map((k) => k.index);
    expect(blinks.length).toBeGreaterThan(0);
    expect(selected.map((c) => c.component).filter((k) => blinks.includes(k))).toEqual([]);
  });

  it('leaves muscle components out', () => {
    // A muscle component: its map is a truth temporalis pattern (|r| >= 0.9), or a third of its energy lies inside the
    // truth's muscle-burst windows. Source: ground truth (muscle-left/right patterns, burst times); thresholds ours.
    const muscles = components.filter((k) => k.rMuscle >= 0.9 || k.muscleShare >= 1 / 3).map((k) => k.index);
    expect(selected.map((c) => c.component).filter((k) => muscles.includes(k))).toEqual([]);
  });

  it('decodes clearly above chance in a quick nested 5-fold cross-validation', () => {
    const n = trials;
    // Source: REFERENCES.md §5 (Combrisson & Jerbi 2015; calc decoding_stats.py): n = 80, two classes: 60.000 % at
    // alpha 0.05, 63.750 % at alpha 0.01.
    expectClose(chanceThreshold(n, 2, 0.05).accuracyNeeded, 0.6, { atol: 1e-12 });
    expectClose(chanceThreshold(n, 2, 0.01).accuracyNeeded, 0.6375, { atol: 1e-12 });
    // Source: shared/evaluation chanceThreshold (checked above against REFERENCES.md §5); "clearly" = alpha 0.01.
    expect(cvAccuracy).toBeGreaterThanOrEqual(chanceThreshold(n, 2, 0.01).accuracyNeeded);
  });
});
