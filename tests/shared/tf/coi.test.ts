import { describe, expect, it } from 'vitest';
import { coneOfInfluence, edgeMask } from '../../../shared/tf/coi';
import { cwtPower } from '../../../shared/tf/cwt';
import { createMorletPlan } from '../../../shared/tf/morlet-plan';
import { expectAllClose } from '../../helpers/all-close';

describe('cone of influence', () => {
  const plan = createMorletPlan({ sampleRateHz: 160, nSamples: 720, frequenciesHz: [4, 10, 25], cycles: 7,
    normalisation: 'unit-energy', padding: 'zero', decimation: 4 });

  it('is the distance to the nearest end over √2 (T&C 1998 Table 1: e-folding time √2·s)', () => {
    const coi = coneOfInfluence(plan);
    const expected = Array.from(plan.outputSamples, (i) => Math.min(i, 719 - i) / 160 / Math.SQRT2);
    // T&C 1998 Table 1 / §3g: s_max(d) = d / sqrt(2), with sigma_t in place of s for n-cycle wavelets.
    expectAllClose(coi, expected, { rtol: 1e-15 });
  });

  it('marks exactly the columns where an edge spike keeps more than e⁻² of its power', () => {
    // T&C 1998 §3g: the COI is where the wavelet power of an edge discontinuity has dropped by e^-2.
    const full = createMorletPlan({ sampleRateHz: 160, nSamples: 720, frequenciesHz: [4, 10, 25], cycles: 7,
      normalisation: 'unit-energy', padding: 'zero' });
    const spike = new Float64Array(720);
    spike[0] = 1;
    const p = cwtPower(full, spike);
    const mask = edgeMask(full);
    for (let j = 0; j < 3; j++) {
      const sigmaSamples = full.sigmaTS[j]! * 160;
      const decay: number[] = [];
      const gaussian: number[] = [];
      for (let t = 0; t < 360; t++) {
        decay.push(p[j * 720 + t]! / p[j * 720]!);
        gaussian.push(Math.exp(-((t / sigmaSamples) ** 2)));
        // Mask = 1 exactly where the spike's relative power still exceeds e^-2 (T&C §3g), first half.
        expect(mask[j * 720 + t], `row ${j} column ${t}`).toBe(decay[t]! > Math.exp(-2) ? 1 : 0);
      }
      // |W|^2 of a spike = |psi(t)|^2 ∝ exp(-t^2/sigma_t^2) (Gaussian envelope, Tallon-Baudry et al. 1997); 1e-8
      // absolute covers the e^-(n^2/2) analyticity floor of n = 7.
      expectAllClose(decay, gaussian, { rtol: 1e-8, atol: 1e-8 });
    }
  });

  it('is symmetric about the middle and shaped [frequency][time]', () => {
    const full = createMorletPlan({ sampleRateHz: 160, nSamples: 720, frequenciesHz: [4, 10, 25], cycles: 7,
      normalisation: 'unit-energy', padding: 'reflect' });
    const mask = edgeMask(full);
    expect(mask.length).toBe(3 * 720);
    const row = (j: number) => Array.from(mask.subarray(j * 720, (j + 1) * 720));
    // T&C 1998 §3g: both record ends have the same cone.
    for (let j = 0; j < 3; j++) expect(row(j)).toEqual([...row(j)].reverse());
    // Lower frequencies have longer wavelets, so a wider cone (T&C 1998 Fig. 1b); 4 Hz, 7 cycles: sqrt(2) sigma_t
    // = 0.394 s = 63.02 samples, so columns 0..63 on each side.
    expect(row(0).filter((v) => v === 1).length).toBe(2 * 64);
    expect(row(0).filter((v) => v === 1).length).toBeGreaterThan(row(1).filter((v) => v === 1).length);
  });
});
