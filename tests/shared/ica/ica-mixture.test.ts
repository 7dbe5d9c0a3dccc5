import { describe, expect, it } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import { applyUnmixing, fitIca, type IcaMethod } from '../../../shared/ica/ica';
import { amariIndex } from '../../../shared/ica/amari';
import { expectAllClose } from '../../helpers/all-close';
import fixture from '../../fixtures/ica/ica_mixture.json';

/** The REFERENCES.md §3 mixture as [channel][sample]. */
const x = [0, 1, 2].map((c) => Float64Array.from(fixture.x, (row) => row[c]!));
const a = fixture.mixing;
const aInv = inverse(new Matrix(a));
/** True sources S = A⁻¹ x (sine, square, Laplacian). */
const sources = [0, 1, 2].map((j) => Float64Array.from(fixture.x, (row) => row.reduce((acc, v, c) => acc + aInv.get(j, c) * v, 0)));

function corr(p: Float64Array, q: Float64Array): number {
  const n = p.length;
  const mp = p.reduce((s, v) => s + v, 0) / n;
  const mq = q.reduce((s, v) => s + v, 0) / n;
  let pq = 0;
  let pp = 0;
  let qq = 0;
  for (let i = 0; i < n; i++) { pq += (p[i]! - mp) * (q[i]! - mq); pp += (p[i]! - mp) ** 2; qq += (q[i]! - mq) ** 2; }
  return pq / Math.sqrt(pp * qq);
}

const globalTimes = (u: Float64Array[]) => u.map((row) => [0, 1, 2].map((j) => row.reduce((acc, v, c) => acc + v * a[c]![j]!, 0)));

describe('ICA on the REFERENCES §3 three-source mixture', () => {
  it('uses the published mixture', () => {
    // REFERENCES.md §3 check rows (printed by ica_amari.py).
    expectAllClose(fixture.x[0]!, [0.011117382791619806, 0.0531092197516832, 0.15735064489714146], { rtol: 1e-15 });
    expectAllClose(fixture.x[1000]!, [-2.3064994455172103, -3.982248591729066, -4.192956417390534], { rtol: 1e-15 });
  });

  it('separates with FastICA at least as well as scikit-learn', () => {
    const f = fitIca(x, { nComponents: 3, method: 'fastica', seed: 0 });
    const e = amariIndex(globalTimes(f.unmixing));
    // REFERENCES.md §3: scikit-learn FastICA reaches Ē = 0.020478 (random_state 0, tol 1e-4).
    expect(e).toBeLessThanOrEqual(0.020478);
    // tests/fixtures/ica/ica_mixture.json fasticaTight: the same fixed point at tol 1e-12 has Ē = 0.0204458.
    expectAllClose([e], [fixture.fasticaTight.amari], { rtol: 0, atol: 2e-5 });
    expect(f.converged).toBe(true);
  });

  it('separates with extended Infomax below the suggested bound', () => {
    const f = fitIca(x, { nComponents: 3, method: 'extended-infomax', seed: 0 });
    const e = amariIndex(globalTimes(f.unmixing));
    // REFERENCES.md §3: suggested assertion Ē < 0.05; the batch extended Infomax there reaches 0.013068
    // and FastICA 0.020478, so a working implementation should be at that level.
    expect(e).toBeLessThan(0.05);
    expect(e).toBeLessThan(0.020478);
    expect(f.converged).toBe(true);
  });

  it.each(['fastica', 'extended-infomax'] as IcaMethod[])('recovers the sources up to sign, scale and order (%s)', (method) => {
    const f = fitIca(x, { nComponents: 3, method, seed: 1 });
    const comps = applyUnmixing(f, x);
    const best = sources.map((s) => Math.max(...comps.map((c) => Math.abs(corr(c, s)))));
    // REFERENCES.md §3 sources (sine, square, Laplacian); |corr| > 0.99 as the brief asks.
    for (const r of best) expect(r).toBeGreaterThan(0.99);
    const matchOf = (j: number) => comps.findIndex((c) => Math.abs(corr(c, sources[j]!)) === best[j]);
    // REFERENCES.md §3 excess kurtosis: sine −1.37 and square −1.99 are sub-Gaussian, Laplacian +2.73 super-Gaussian.
    expect([0, 1, 2].map((j) => f.kurtosisSigns[matchOf(j)])).toEqual([-1, -1, 1]);
  });

  it.each(['fastica', 'extended-infomax'] as IcaMethod[])('is deterministic for a seed (%s)', (method) => {
    const f1 = fitIca(x, { nComponents: 3, method, seed: 42 });
    const f2 = fitIca(x, { nComponents: 3, method, seed: 42 });
    // Common practice: the same seed reproduces the fit bit for bit.
    expect(f2.unmixing).toEqual(f1.unmixing);
    expect(f2.mixing).toEqual(f1.mixing);
    expect(f2.iterations).toBe(f1.iterations);
  });
});
