import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../../../helpers/all-close';
import { classCovariances, cspFromCovariances, cspStage } from '../../../../shared/decoder/baselines/csp';
import { fitPipeline, pipelineFromArtifact } from '../../../../shared/decoder/pipeline';
import { createRng } from '../../../../shared/linalg/random';
import type { Epochs } from '../../../../shared/types';
import fixture from '../../../fixtures/baselines/csp.json';

const toEpochs = (e: number[][][]): Epochs => e.map((t) => t.map((ch) => Float64Array.from(ch)));

/** Unit norm, sign fixed so the largest-magnitude entry is positive (filters are defined up to scale and sign). */
function canon(v: ArrayLike<number>): number[] {
  let norm = 0, big = 0;
  for (let i = 0; i < v.length; i++) { norm += v[i]! ** 2; if (Math.abs(v[i]!) > Math.abs(big)) big = v[i]!; }
  const s = Math.sign(big) / Math.sqrt(norm);
  return Array.from(v, (x) => x * s);
}

describe('CSP against scipy.linalg.eigh(C0, C0 + C1)', () => {
  it.each(fixture.cases)('class covariances, eigenvalues and filters match on $name', (c) => {
    const x = toEpochs(c.epochs), y = Uint8Array.from(c.labels);
    const channels = x[0]!.length;
    const [c0, c1] = classCovariances(x, y);
    // Source: tests/fixtures/baselines/csp.json (trace-normalised class-mean covariances, Ramoser et al. 2000).
    expectAllClose(c0, c.expected.c0, { rtol: 1e-12, atol: 1e-15 });
    expectAllClose(c1, c.expected.c1, { rtol: 1e-12, atol: 1e-15 });
    const all = cspFromCovariances(c0, c1, channels);
    // Source: same fixture, eigh eigenvalues (ascending there, descending here).
    expectAllClose(Array.from(all.eigenvalues).reverse(), c.expected.eigenvaluesAscending, { rtol: 1e-9, atol: 1e-12 });
    // Source: same fixture, eigh eigenvectors, compared up to sign and scale.
    const expectedRows = [...c.expected.eigenvectorsColumns].reverse();
    all.filters.forEach((w, k) => expectAllClose(canon(w), canon(expectedRows[k]!), { rtol: 1e-7, atol: 1e-9 }));
  });

  it.each(fixture.cases)('stage features on held-out epochs match on $name', (c) => {
    const fitted = cspStage({ pairs: c.pairs }).fit(toEpochs(c.epochs), Uint8Array.from(c.labels));
    // Source: tests/fixtures/baselines/csp.json (eigh filters normalised wᵀ(C0+C1)w = 1, log(var/Σvar) features).
    expectAllClose(fitted.eigenvalues, c.expected.selectedEigenvalues, { rtol: 1e-9, atol: 1e-12 });
    expectAllClose(fitted.transform(toEpochs(c.testEpochs)).flatMap((r) => Array.from(r)),
                   c.expected.testFeatures.flat(), { rtol: 1e-7, atol: 1e-9 });
  });
});

describe('CSP invariants', () => {
  const rng = createRng(5);
  const mixing = Array.from({ length: 8 }, () => Array.from({ length: 8 }, () => rng.nextNormal()));
  const y = Uint8Array.from({ length: 20 }, (_, i) => i % 2);
  // Common average reference: rank 7 with 8 channels.
  const x: Epochs = Array.from(y, (cls) => {
    const s = Array.from({ length: 8 }, (_, k) => Float64Array.from({ length: 64 }, () =>
      rng.nextNormal() * (k === 0 && cls === 0 ? 3 : k === 1 && cls === 1 ? 3 : 1)));
    const ch = mixing.map((row) => { const o = new Float64Array(64); row.forEach((a, k) => s[k]!.forEach((v, t) => { o[t]! += a * v; })); return o; });
    const mean = new Float64Array(64);
    for (const c of ch) c.forEach((v, t) => { mean[t]! += v / 8; });
    return ch.map((c) => c.map((v, t) => v - mean[t]!));
  });

  it('handles rank-deficient (average-referenced) data: filters whiten the composite covariance', () => {
    const [c0, c1] = classCovariances(x, y);
    const all = cspFromCovariances(c0, c1, 8);
    // Source: Ramoser et al. 2000 (W (C0 + C1) Wᵀ = I on the data's rank-7 subspace; one direction dropped).
    expect(all.filters).toHaveLength(7);
    const gram = all.filters.flatMap((w) => all.filters.map((v) => {
      let s = 0;
      for (let a = 0; a < 8; a++) for (let b = 0; b < 8; b++) s += w[a]! * (c0[a * 8 + b]! + c1[a * 8 + b]!) * v[b]!;
      return s;
    }));
    expectAllClose(gram, Array.from({ length: 49 }, (_, i) => (i % 8 === 0 ? 1 : 0)), { atol: 1e-9 });
    // Source: patterns are the pseudo-inverse columns: wᵢ·aⱼ = δᵢⱼ (Ramoser et al. 2000, W⁻¹).
    const wa = all.filters.flatMap((w) => all.patterns.map((a) => w.reduce((s, wi, i) => s + wi * a[i]!, 0)));
    expectAllClose(wa, Array.from({ length: 49 }, (_, i) => (i % 8 === 0 ? 1 : 0)), { atol: 1e-9 });
  });

  it('first filters favour class 0 variance and last ones class 1; features survive a JSON round trip', () => {
    const fitted = cspStage({ pairs: 2 }).fit(x, y);
    const f = fitted.transform(x);
    const meanOf = (cls: number, k: number) => f.filter((_, i) => y[i] === cls).reduce((s, r) => s + r[k]!, 0) / 10;
    // Source: Ramoser et al. 2000 (largest ψ: high class-0 variance; smallest: high class-1 variance).
    expect(meanOf(0, 0)).toBeGreaterThan(meanOf(1, 0));
    expect(meanOf(1, 3)).toBeGreaterThan(meanOf(0, 3));
    const p = fitPipeline([cspStage({ pairs: 2 })], x, y);
    const back = pipelineFromArtifact<Epochs>(JSON.parse(JSON.stringify(p.toArtifact())));
    // Source: pipeline contract (exact artifact round trip).
    expect(back.transform(x)).toEqual(p.transform(x));
  });

  it('refuses more pairs than the rank allows and does not modify its input', () => {
    const copy = x.map((t) => t.map((c) => Float64Array.from(c)));
    // Source: Ramoser et al. 2000 (at most rank/2 pairs) and STYLE.md §4.
    expect(() => cspStage({ pairs: 4 }).fit(x, y)).toThrow(/pairs/);
    cspStage().fit(x, y);
    expect(x).toEqual(copy);
  });
});
