import { describe, expect, it } from 'vitest';
import { applyUnmixing, fitIca, type FittedIca } from '../../../shared/ica/ica';
import { amariIndex } from '../../../shared/ica/amari';
import { fromArtifact, toArtifact } from '../../../shared/ica/artifact';
import { createRng } from '../../../shared/linalg/random';
import { ParamError, ShapeError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';

/**
 * Invented test data: `sources` independent sources (Laplacian, sinusoid, uniform in turn)
 * mixed into `channels` channels by a seeded Gaussian matrix, plus white sensor noise.
 */
function mixture(channels: number, sources: number, samples: number, noise: number, seed: number) {
  const rng = createRng(seed);
  const s = Array.from({ length: sources }, (_, j) => Float64Array.from({ length: samples }, (_, t) => {
    if (j % 3 === 0) return Math.log(rng.nextFloat() / rng.nextFloat()) / Math.SQRT2; // Laplacian, unit variance
    if (j % 3 === 1) return Math.SQRT2 * Math.sin(2 * Math.PI * (0.011 + 0.0013 * j) * t + j);
    return Math.sqrt(3) * (2 * rng.nextFloat() - 1);
  }));
  const a = Array.from({ length: channels }, () => Float64Array.from({ length: sources }, () => rng.nextNormal()));
  const x = a.map((row) => Float64Array.from({ length: samples }, (_, t) => {
    let acc = noise * rng.nextNormal() + 10; // a DC offset: ICA must centre
    for (let j = 0; j < sources; j++) acc += row[j]! * s[j]![t]!;
    return acc;
  }));
  return { x, a };
}

function globalMatrix(f: FittedIca, a: Float64Array[]): number[][] {
  const m = a[0]!.length;
  return f.unmixing.map((u) => Array.from({ length: m }, (_, j) => u.reduce((acc, v, c) => acc + v * a[c]![j]!, 0)));
}

describe('fitIca with rank reduction', () => {
  const { x, a } = mixture(64, 15, 8000, 0.05, 3);
  const fits = {
    infomax: fitIca(x, { nComponents: 15, method: 'extended-infomax', seed: 0 }),
    fastica: fitIca(x, { nComponents: 15, method: 'fastica', seed: 0 }),
  };

  it.each(Object.entries(fits))('separates 15 sources from 64 noisy channels (%s)', (_, f) => {
    // REFERENCES.md §3: Ē < 0.05 for a working implementation (random ≈ 0.43); invented mixture.
    expect(amariIndex(globalMatrix(f, a))).toBeLessThan(0.05);
    expect(f.converged).toBe(true);
    expect(f.unmixing.length).toBe(15);
    expect(f.mixing.length).toBe(64);
  });

  it.each(Object.entries(fits))('returns a mixing matrix that inverts the unmixing (%s)', (_, f) => {
    const ua = f.unmixing.map((u) => Array.from({ length: 15 }, (_, j) => u.reduce((acc, v, c) => acc + v * f.mixing[c]![j]!, 0)));
    // Definition of the pseudo-inverse of a full-row-rank U: U A = I.
    expectAllClose(ua.flat(), Array.from({ length: 225 }, (_, i) => (i % 16 === 0 ? 1 : 0)), { atol: 1e-9 });
  });

  it.each(Object.entries(fits))('gives unit-variance components ordered by explained variance (%s)', (_, f) => {
    const comps = applyUnmixing(f, x);
    const variances = comps.map((c) => {
      const mu = c.reduce((s, v) => s + v, 0) / c.length;
      return c.reduce((s, v) => s + (v - mu) ** 2, 0) / (c.length - 1);
    });
    // Module convention (shared/ica/ica.ts): unit variance on the training data (N − 1 normalisation).
    expectAllClose(variances, new Array(15).fill(1), { rtol: 1e-9 });
    // Module convention: explainedVariance sorted from largest to smallest.
    for (let j = 1; j < 15; j++) expect(f.explainedVariance[j]!).toBeLessThanOrEqual(f.explainedVariance[j - 1]!);
    // Module convention: each map's largest-magnitude entry is positive.
    for (let j = 0; j < 15; j++) {
      const col = f.mixing.map((row) => row[j]!);
      const big = col.reduce((p, v) => (Math.abs(v) > Math.abs(p) ? v : p), 0);
      expect(big).toBeGreaterThan(0);
    }
  });

  it('centres the data: the channel mean is learned and removed', () => {
    const f = fits.fastica;
    const mu0 = x[0]!.reduce((s, v) => s + v, 0) / x[0]!.length;
    // Definition of centring.
    expectClose(f.mean[0]!, mu0, { rtol: 1e-12 });
    const comps = applyUnmixing(f, x, [2, 0]);
    const direct = x[0]!.map((_, t) => f.unmixing[2]!.reduce((acc, u, c) => acc + u * (x[c]![t]! - f.mean[c]!), 0));
    // Definition of applyUnmixing: s_j = U_j (x − mean), for the chosen components in the given order.
    expectAllClose(comps[0]!, direct, { rtol: 1e-9, atol: 1e-9 });
    expect(comps.length).toBe(2);
  });
});

describe('fitIca special inputs', () => {
  it('handles a flat channel by rank reduction, without NaN', () => {
    const { x } = mixture(8, 4, 3000, 0.01, 5);
    x[3] = new Float64Array(3000).fill(-7.5);
    const f = fitIca(x, { nComponents: 4, method: 'extended-infomax', seed: 1 });
    const all = [...f.unmixing, ...f.mixing, f.explainedVariance].flatMap((r) => Array.from(r));
    // Common practice (STYLE.md §4 "a flat channel"): finite output.
    expect(all.every(Number.isFinite)).toBe(true);
    // A zero-variance channel is orthogonal to every principal direction: zero map entry and weight.
    expectAllClose(f.mixing[3]!, [0, 0, 0, 0], { atol: 1e-12 });
    expectAllClose(f.unmixing.map((u) => u[3]!), [0, 0, 0, 0], { atol: 1e-12 });
    // Rank of 8 channels with one flat is 7: asking for 8 components is refused.
    expect(() => fitIca(x, { nComponents: 8, method: 'fastica', seed: 1 })).toThrow(ParamError);
  });

  it('does not modify its input', () => {
    const { x } = mixture(6, 3, 2000, 0.01, 6);
    const copy = x.map((r) => Float64Array.from(r));
    fitIca(x, { nComponents: 3, method: 'extended-infomax', seed: 0 });
    fitIca(x, { nComponents: 3, method: 'fastica', seed: 0 });
    // Common practice: numeric routines leave their inputs untouched.
    expect(x).toEqual(copy);
  });

  it('rejects bad shapes and parameters', () => {
    const { x } = mixture(4, 2, 500, 0.01, 7);
    // STYLE.md §3: shape errors and parameter errors name their field.
    expect(() => fitIca([x[0]!, x[1]!.subarray(1)], { nComponents: 1, method: 'fastica', seed: 0 })).toThrow(ShapeError);
    expect(() => fitIca(x, { nComponents: 5, method: 'fastica', seed: 0 })).toThrow(ParamError);
    expect(() => fitIca(x, { nComponents: 2, method: 'fastica', seed: -1 })).toThrow(ParamError);
    const withNaN = x.map((r) => Float64Array.from(r));
    withNaN[1]![10] = Number.NaN;
    expect(() => fitIca(withNaN, { nComponents: 2, method: 'fastica', seed: 0 })).toThrow(ParamError);
    const f = fitIca(x, { nComponents: 2, method: 'fastica', seed: 0 });
    expect(() => applyUnmixing(f, x.slice(1))).toThrow(ShapeError);
    expect(() => applyUnmixing(f, x, [2])).toThrow(ParamError);
  });
});

describe('ICA artifact', () => {
  it('survives a JSON round trip exactly and rejects a damaged artifact', () => {
    const { x } = mixture(6, 3, 2000, 0.01, 8);
    const f = fitIca(x, { nComponents: 3, method: 'extended-infomax', seed: 0 });
    const back = fromArtifact(JSON.parse(JSON.stringify(toArtifact(f))));
    // Common practice: JSON numbers round-trip doubles exactly, so the rebuilt fit is identical.
    expect(back).toEqual(f);
    const bad = toArtifact(f);
    bad.mixing[0] = [1, 2];
    // STYLE.md §3: a wrong shape is a ShapeError naming the field.
    expect(() => fromArtifact(bad)).toThrow(ShapeError);
    expect(() => fromArtifact({ ...toArtifact(f), kind: 'csp' })).toThrow(ParamError);
  });
});
