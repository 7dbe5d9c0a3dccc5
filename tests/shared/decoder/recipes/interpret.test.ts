import { describe, expect, it } from 'vitest';
import { interpretDecoder } from '../../../../shared/decoder/interpret';
import { trialCovariance } from '../../../../shared/decoder/recipes/covariance';
import { expectAllClose, expectClose } from '../../../helpers/all-close';
import { fittedDecoder } from '../../../fixtures/decoder/fitted';

describe('interpretation data', () => {
  it('gives each selected component a unit-norm frequency profile and time course with W v = σ u', () => {
    const { artifact } = fittedDecoder('component-tf');
    const interp = interpretDecoder(artifact, 5);
    if (interp.recipe !== 'component-tf') throw new Error('expected component-tf');
    // Common practice: the synthetic ERD must select at least one component.
    expect(interp.components.length).toBeGreaterThan(0);
    for (const c of interp.components) {
      const u = c.frequencyProfile, v = c.timeCourse, s = c.singularValues[0]!;
      const wv = c.weights.map((row) => row.reduce((acc, x, t) => acc + x * v[t]!, 0));
      // Source: definition of the SVD (W v₁ = σ₁ u₁; ‖u₁‖ = ‖v₁‖ = 1; ‖W‖_F² = Σ σ²), Golub & Van Loan §2.4.
      expectAllClose(wv, u.map((x) => s * x), { rtol: 1e-8, atol: 1e-10 * s });
      expectClose(Math.hypot(...u), 1, { rtol: 1e-10 });
      expectClose(Math.hypot(...v), 1, { rtol: 1e-10 });
      expect(c.weights).toHaveLength(c.frequenciesHz.length);
      expect(c.map).toHaveLength(c.channelNames.length);
      expect(c.frequenciesHz).toContain(c.peakFrequencyHz);
    }
  });

  it('gives covariance patterns equal to the training mean covariance times the filters', () => {
    const { artifact, train } = fittedDecoder('covariance');
    const interp = interpretDecoder(artifact);
    if (interp.recipe !== 'covariance') throw new Error('expected covariance');
    expect(interp.spatialPatterns.length).toBeGreaterThan(0);
    const c = artifact.channelNames.length;
    const mean = new Float64Array(c * c);
    for (const t of train) trialCovariance(t).forEach((v, j) => { mean[j]! += v / train.length; });
    for (const p of interp.spatialPatterns) {
      const cf = Array.from({ length: c }, (_, a) => p.filter.reduce((acc, f, b) => acc + mean[a * c + b]! * f, 0));
      // Source: Haufe et al. 2014, NeuroImage 87:96-110 (pattern = covariance × filter for one source).
      expectAllClose(p.pattern, cf, { rtol: 1e-6, atol: 1e-9 * Math.max(...cf.map(Math.abs)) });
    }
  });
});
