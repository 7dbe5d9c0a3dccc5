import { describe, expect, it } from 'vitest';
import { epochRecording } from '../../../../shared/decoder/epochs';
import { preprocessRecording } from '../../../../shared/decoder/online';
import { fitPipeline, type AnyStage } from '../../../../shared/decoder/pipeline';
import { planRecipe } from '../../../../shared/decoder/recipes';
import { whitenedCovarianceStage } from '../../../../shared/decoder/recipes/covariance';
import { spdLog } from '../../../../shared/linalg/spd-log';
import { icaStage } from '../../../../shared/decoder/recipes/ica-stage';
import { binnedLogPower, morletGrid } from '../../../../shared/decoder/recipes/morlet-stage';
import { traceNormCvStage } from '../../../../shared/decoder/recipes/tracenorm-cv';
import { createRng } from '../../../../shared/linalg/random';
import { cwtPower } from '../../../../shared/tf/cwt';
import { createMorletPlan } from '../../../../shared/tf/morlet-plan';
import { expectAllClose, expectClose } from '../../../helpers/all-close';
import { syntheticRecording } from '../../../fixtures/decoder/synthetic';

describe('binned Morlet log power', () => {
  it('equals the log of the mean full-resolution CWT power at the bin\'s reading samples', () => {
    const params = { sampleRateHz: 160, nSamples: 720, lowHz: 4, highHz: 40, count: 16, cycles: 7, binS: 0.25 };
    const grid = morletGrid(params);
    const rng = createRng(3);
    const x = Float64Array.from({ length: 720 }, () => rng.nextNormal());
    const out = new Float64Array(16 * grid.nBins);
    binnedLogPower(grid, x, out, 0, new Float64Array(16 * grid.plan.nTimes));
    const full = cwtPower(createMorletPlan({ sampleRateHz: 160, nSamples: 720, frequenciesHz: grid.frequenciesHz, cycles: 7,
                                             normalisation: 'unit-energy', padding: 'reflect' }), x);
    const expected = new Float64Array(16 * grid.nBins);
    for (let f = 0; f < 16; f++) {
      for (let b = 0; b < grid.nBins; b++) {
        let acc = 0;
        for (let j = 0; j < 5; j++) acc += full[f * 720 + b * 40 + 4 + 8 * j]!;
        expected[f * grid.nBins + b] = Math.log(acc / 5);
      }
    }
    // Source: morlet-stage.ts (readings at b·40 + 4 + 8j, P = 5 per 0.25 s bin at 160 Hz); shared/tf/cwt.ts
    // (the decimated inverse is an exact identity), so only rounding differs.
    expect(grid.nBins).toBe(18);
    expectAllClose(out, expected, { rtol: 1e-10, atol: 1e-10 });
  });
});

describe.each(['linear', 'log'] as const)('whitened covariance features, %s map', (map) => {
  const rec = syntheticRecording({ seed: 8, trials: 30 });
  const plan = planRecipe({ recipe: 'covariance' }, rec.sampleRateHz, rec.channelNames);
  const e = epochRecording(preprocessRecording(plan.preprocess, rec), { classes: ['left', 'right'] }, 0.5, 2.5);
  const train = e.epochs.slice(0, 24), test = e.epochs.slice(24), y = e.labels.slice(0, 24);

  it('are centred with unit RMS on the training trials', () => {
    const f = whitenedCovarianceStage({ map }).fit(train).transform(train).features.x;
    const dim = f.length / 24;
    let ms = 0;
    const mean = new Float64Array(dim);
    for (let i = 0; i < 24; i++) for (let j = 0; j < dim; j++) { mean[j]! += f[i * dim + j]! / 24; ms += f[i * dim + j]! ** 2 / (24 * dim); }
    // Source: covariance.ts module comment (centre S̄ and RMS scale fitted on training trials).
    expectAllClose(mean, new Float64Array(dim), { atol: 1e-10 });
    expectClose(ms, 1, { rtol: 1e-10 });
  });

  it('form one symmetric block, and the classifier keeps its weight symmetric', () => {
    const x = whitenedCovarianceStage({ map }).fit(train).transform(train);
    const r = train[0]!.length;
    // Source: covariance.ts module comment (one r×r block per trial, F_i = (P C_i Pᵀ − S̄)/s is symmetric).
    expect(x.features.blocks).toEqual([{ rows: r, cols: r, symmetric: true }]);
    const w = fitPipeline([whitenedCovarianceStage({ map }) as AnyStage, traceNormCvStage({ count: 4 }) as AnyStage], train, y, { seed: 1, innerK: 3 })
      .stages[1] as unknown as { model: { weights: Float64Array[]; lambda: number } };
    const wk = w.model.weights[0]!;
    for (let i = 0; i < r; i++) for (let j = 0; j < i; j++) {
      // Definition: the gradient Σ r_i F_i of symmetric features is symmetric, so is the eigenvalue-thresholded weight.
      expect(wk[i * r + j]).toBe(wk[j * r + i]);
    }
  });

  it('make the decoder invariant to an invertible mixing of the channels', () => {
    const rng = createRng(12);
    const c = train[0]!.length;
    const a = Array.from({ length: c }, (_, i) => Float64Array.from({ length: c }, (_, j) => (i === j ? 1 : 0) + 0.3 * rng.nextNormal()));
    const mix = (ep: Float64Array[][]) => ep.map((trial) => a.map((row) => {
      const out = new Float64Array(trial[0]!.length);
      row.forEach((w, j) => { for (let t = 0; t < out.length; t++) out[t]! += w * trial[j]![t]!; });
      return out;
    }));
    const stages = (): AnyStage[] => [whitenedCovarianceStage({ map }) as AnyStage, traceNormCvStage({ count: 5, tol: 1e-9, maxIter: 20000 }) as AnyStage];
    const p1 = fitPipeline(stages(), train, y, { seed: 1, innerK: 3 }).predictProba(test);
    const p2 = fitPipeline(stages(), mix(train), y, { seed: 1, innerK: 3 }).predictProba(mix(test));
    // Source: covariance.ts (S_i → Q S_i Qᵀ, Q orthogonal, and log(Q S Qᵀ) = Q log(S) Qᵀ; trace norm and loss
    // unchanged); solver tolerance limits agreement.
    expectAllClose(p2, p1, { atol: 1e-5 });
  });
});

describe('the log covariance map', () => {
  const rec = syntheticRecording({ seed: 8, trials: 30 });
  const plan = planRecipe({ recipe: 'covariance' }, rec.sampleRateHz, rec.channelNames);
  const e = epochRecording(preprocessRecording(plan.preprocess, rec), { classes: ['left', 'right'] }, 0.5, 2.5);
  const train = e.epochs.slice(0, 24), test = e.epochs.slice(24);

  it('applies the matrix logarithm to the whitened covariance', () => {
    const lin = whitenedCovarianceStage({ map: 'linear' }).fit(train) as unknown as { whitening: Float64Array[]; centre: Float64Array; scale: number; transform: (x: typeof train) => { features: { x: Float64Array } } };
    const log = whitenedCovarianceStage({ map: 'log' }).fit(train) as unknown as typeof lin;
    const r = lin.whitening.length;
    const s0 = lin.transform(test.slice(0, 1)).features.x.map((v, j) => v * lin.scale + lin.centre[j]!);
    const l0 = log.transform(test.slice(0, 1)).features.x.map((v, j) => v * log.scale + log.centre[j]!);
    // Definition (Arsigny et al. 2007): the log map's feature is log S of the linear map's S = P C Pᵀ (same P).
    expectAllClose(l0, spdLog(s0, r), { rtol: 1e-9, atol: 1e-12 });
  });
});

describe('the ICA stage', () => {
  it('penalises the eye component more and gives all weights 1 with the prior off', () => {
    const rec = syntheticRecording({ seed: 2, trials: 16 });
    const plan = planRecipe({ recipe: 'component-tf' }, rec.sampleRateHz, rec.channelNames);
    const e = epochRecording(preprocessRecording(plan.preprocess, rec), { classes: ['left', 'right'] }, -0.5, 4);
    const params = { nComponents: 6, method: 'fastica' as const, channelNames: plan.preprocess.channelNames, sampleRateHz: 128, bandHz: [1, 40] as [number, number] };
    const on = icaStage({ ...params, prior: true }).fit(e.epochs, e.labels, { seed: 1 }) as ReturnType<ReturnType<typeof icaStage>['fit']> & { blockWeights: Float64Array; plausibility: { subScores: { eye: number } }[] };
    const off = icaStage({ ...params, prior: false }).fit(e.epochs, e.labels, { seed: 1 }) as typeof on;
    const eye = on.plausibility.map((p) => p.subScores.eye);
    const k = eye.indexOf(Math.max(...eye));
    // Source: tests/fixtures/decoder/synthetic.ts (a slow Fp1/Fp2 blink source) and prior.ts.
    expect(eye[k]).toBeGreaterThan(0.5);
    expect(on.blockWeights[k]).toBeGreaterThan(2);
    // Source: issue 4 part 3 (--no-prior: every w_k = 1).
    expect(Array.from(off.blockWeights)).toEqual(new Array(6).fill(1));
  });
});
