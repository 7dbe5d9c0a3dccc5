import { describe, expect, it } from 'vitest';
import { applyUnmixing, type FittedIca } from '../../../../shared/ica/ica';
import { interpretDecoder } from '../../../../shared/decoder/interpret';
import { activationPatterns, bandPatterns, trainingFeatures } from '../../../../shared/decoder/interpret-patterns';
import { decodeRows, type FittedPipeline } from '../../../../shared/decoder/pipeline';
import { loadDecoder, predictFilteredEpoch } from '../../../../shared/decoder/predict';
import type { ComponentTfModel } from '../../../../shared/decoder/artifact';
import type { FittedTraceNormCv } from '../../../../shared/decoder/recipes/tracenorm-cv';
import type { MatrixTrials } from '../../../../shared/decoder/recipes/matrix-trials';
import type { MorletFeatureParams } from '../../../../shared/decoder/recipes/morlet-stage';
import { describeFinalModel } from '../../../../shared/decoder/recipes/summary';
import { cwtPower } from '../../../../shared/tf/cwt';
import { createMorletPlan } from '../../../../shared/tf/morlet-plan';
import { expectAllClose, expectClose } from '../../../helpers/all-close';
import { fittedDecoder } from '../../../fixtures/decoder/fitted';

const fx = fittedDecoder('component-tf');
const model = fx.artifact.model as ComponentTfModel;
const feats = trainingFeatures(fx.artifact, { epochs: fx.train });

describe('activation patterns of a component-tf decoder (Haufe et al. 2014)', () => {
  it('uses the decision values the frozen decoder gives the training epochs', () => {
    const d = loadDecoder(fx.artifact);
    const z = fx.train.map((x) => predictFilteredEpoch(d, { kind: 'filtered-epoch', data: x, filledSamples: 0 } as never).decisionValue);
    // Source: predict.ts (the decoder's decision, shared with the live stream) on the same epochs.
    expectAllClose(feats.decision, z, { rtol: 1e-10, atol: 1e-10 });
  });

  it('gives the log-power pattern A = Σ_x W / Var(ŷ) of the linear model on the z-scored features', () => {
    // Haufe et al. 2014, NeuroImage 87:96-110, eq. 6 with one decision value: A = Σ_x W Σ_ŷ⁻¹. On the z-scored
    // features z (the classifier's input, from the fitted pipeline's own stages) ŷ = b + Σ_j w_j z_j, so
    // Cov(z_j, ŷ) = (Σ_z w)_j; the log power x_j = μ_j + s_j z_j scales that by s_j.
    const fp = fx.fp as unknown as FittedPipeline<unknown>;
    let z = fx.train as unknown;
    for (const s of fp.stages.slice(0, -1)) z = s.transform(z);
    const zt = (z as MatrixTrials).features;
    const clf = fp.stages[fp.stages.length - 1] as unknown as FittedTraceNormCv;
    const dim = zt.x.length / zt.nTrials, n = zt.nTrials;
    const size = feats.blockSize;
    const w = new Float64Array(dim);
    clf.model.weights.forEach((wk, k) => w.set(wk, k * size));
    const mean = new Float64Array(dim);
    for (let i = 0; i < n; i++) for (let j = 0; j < dim; j++) mean[j]! += zt.x[i * dim + j]! / n;
    const yhat = Float64Array.from({ length: n }, (_, i) => clf.model.bias + w.reduce((acc, wj, j) => acc + wj * zt.x[i * dim + j]!, 0));
    const ym = yhat.reduce((a, b) => a + b, 0) / n;
    const vy = yhat.reduce((a, b) => a + (b - ym) ** 2, 0) / n;
    const sw = new Float64Array(dim); // Σ_z w, population covariance
    for (let i = 0; i < n; i++) {
      let proj = 0;
      for (let j = 0; j < dim; j++) proj += (zt.x[i * dim + j]! - mean[j]!) * w[j]!;
      for (let j = 0; j < dim; j++) sw[j]! += ((zt.x[i * dim + j]! - mean[j]!) * proj) / n;
    }
    const patterns = activationPatterns(feats, 'log-power');
    const std = fp.stages[2] as unknown as { scale: Float64Array };
    model.selected.forEach((k, i) => {
      const expected = Float64Array.from({ length: size }, (_, j) => (std.scale[k * size + j]! * sw[k * size + j]!) / vy);
      expectAllClose(patterns[i]!, expected, { rtol: 1e-6, atol: 1e-9 * Math.max(...expected.map(Math.abs)) });
    });
  });

  it('finds the synthetic ERD at its frequency and inside its window', () => {
    const interp = interpretDecoder(fx.artifact, 1, { epochs: fx.train });
    if (interp.recipe !== 'component-tf') throw new Error('expected component-tf');
    const top = [...interp.components].sort((a, b) => b.weightNorm - a.weightNorm)[0]!;
    expect(top.profileSource).toBe('activation-pattern');
    // Source: tests/fixtures/decoder/synthetic.ts (10 Hz mu sources, ERD from 0.5 to 3 s); 1.5 Hz as in issue 5 part 6.
    expectClose(top.peakFrequencyHz, 10, { atol: 1.5, rtol: 0 });
    expect(top.peakTimeS).toBeGreaterThan(0.5);
    expect(top.peakTimeS).toBeLessThan(3);
    // Source: interpret.ts keeps the weights' own peaks, and without training epochs reports those.
    const bare = interpretDecoder(fx.artifact, 1);
    if (bare.recipe !== 'component-tf') throw new Error('expected component-tf');
    const b = bare.components.find((c) => c.component === top.component)!;
    expect(b.profileSource).toBe('weights');
    expect(b.peakFrequencyHz).toBe(top.weightPeakFrequencyHz);
    expect(b.activationPattern).toBeNull();
  });

  it('gives band patterns whose projection on the filter is the covariance of the component\'s band power with ŷ', () => {
    // With g_c = mean_t Re(x_c conj(s)), Σ_c w_c g_c = mean_t |s(t)|² (s = wᵀx, the CWT is linear): the component's
    // CWT power at f, computed here from the activation itself (applyUnmixing, cwtPower; Torrence & Compo 1998 eq. 6).
    const f = 10.5;
    const freqs = model.selected.map(() => f);
    const maps = bandPatterns(fx.artifact, { epochs: fx.train }, feats, freqs);
    const rows = decodeRows(model.unmixing, 'model.unmixing');
    const ica = { mean: new Float64Array(fx.artifact.channelNames.length), unmixing: rows, mixing: [] } as unknown as FittedIca;
    const plan = createMorletPlan({ sampleRateHz: fx.artifact.sampleRateHz, nSamples: model.cwt.nSamples, frequenciesHz: [f],
                                    cycles: model.cwt.cycles, normalisation: 'unit-energy', padding: 'reflect', decimation: 2 });
    const n = fx.train.length;
    const ym = feats.decision.reduce((a, b) => a + b, 0) / n;
    const vy = feats.decision.reduce((a, b) => a + (b - ym) ** 2, 0);
    model.selected.forEach((_, k) => {
      let cov = 0;
      fx.train.forEach((x, i) => {
        const p = cwtPower(plan, applyUnmixing(ica, x, [k])[0]!);
        cov += (p.reduce((a, b) => a + b, 0) / p.length) * (feats.decision[i]! - ym) / vy;
      });
      const proj = rows[k]!.reduce((acc, wc, c) => acc + wc * maps[k]![c]!, 0);
      expectClose(proj, cov, { rtol: 1e-8, atol: 1e-12 * Math.abs(cov) });
    });
  });

  it('puts the activation-pattern peaks in the training report when given the training epochs', () => {
    const classes: [string, string] = ['left', 'right'];
    const run = (epochs?: typeof fx.train) => describeFinalModel(fx.fp as never, 'component-tf', classes, fx.artifact.channelNames, fx.plan.window,
      fx.artifact.sampleRateHz, fx.plan.settings.morlet as MorletFeatureParams, true, epochs).selectedComponents!;
    const withData = run(fx.train);
    const bare = run();
    const interp = interpretDecoder(fx.artifact, 1, { epochs: fx.train });
    if (interp.recipe !== 'component-tf') throw new Error('expected component-tf');
    // Source: summary.ts module comment (peaks from interpret.ts: the pattern's with training epochs, else the weights').
    for (const c of withData) {
      const i = interp.components.find((x) => x.component === c.index)!;
      expect([c.peakSource, c.peakFrequencyHz, c.peakTimeS]).toEqual(['activation-pattern', i.peakFrequencyHz, i.peakTimeS]);
      expect([c.weightPeakFrequencyHz, c.weightPeakTimeS]).toEqual([i.weightPeakFrequencyHz, i.weightPeakTimeS]);
    }
    for (const c of bare) expect([c.peakSource, c.peakFrequencyHz]).toEqual(['weights', c.weightPeakFrequencyHz]);
  });
});
