import { describe, expect, it } from 'vitest';
import { type MatrixFeatures, blockFactors, lambdaMax } from '../../../shared/decoder/tracenorm';
import { traceNormPath } from '../../../shared/decoder/tracenorm-path';
import { createRng } from '../../../shared/linalg/random';
import { ParamError } from '../../../shared/types';
import { expectClose } from '../../helpers/all-close';

const ROWS = 6;
const COLS = 8;
const PLANTED = [3, 8];
/** Unit row profile (e.g. a frequency band) and column profile (e.g. a time window) of the effect. */
const U = [0, 0.5, 0.5, 0.5, 0.5, 0];
const V = [0, 0, 0.5, 0.5, 0.5, 0.5, 0, 0];

/**
 * 200 trials, 10 blocks of 6×8 N(0,1) noise; in blocks 3 and 8 class 1 adds +c·u vᵀ and class 0
 * adds −c·u vᵀ (a planted rank-1 signal). Invented data (seeded) for a recovery test.
 */
function planted(seed: number, c = 0.6): { features: MatrixFeatures; labels: Uint8Array } {
  const rng = createRng(seed);
  const nTrials = 200;
  const size = ROWS * COLS;
  const dim = 10 * size;
  const labels = Uint8Array.from({ length: nTrials }, (_, i) => (i * 7) % 2);
  const x = Float64Array.from({ length: nTrials * dim }, () => rng.nextNormal());
  for (let i = 0; i < nTrials; i++) {
    const sgn = labels[i] === 1 ? c : -c;
    for (const k of PLANTED) for (let r = 0; r < ROWS; r++) for (let q = 0; q < COLS; q++) x[i * dim + k * size + r * COLS + q]! += sgn * U[r]! * V[q]!;
  }
  return { features: { nTrials, blocks: Array.from({ length: 10 }, () => ({ rows: ROWS, cols: COLS })), x }, labels };
}

describe('traceNormPath', () => {
  const { features, labels } = planted(1);
  const path = traceNormPath(features, labels, { count: 12, minRatio: 0.2 });

  it('starts at λ_max with the all-zero model and decreases λ geometrically', () => {
    // REFERENCES.md §4: at λ = λ_max every W_k = 0.
    expectClose(path.lambdas[0]!, lambdaMax(features, labels), { rtol: 1e-15 });
    expect(path.models[0]!.activeBlocks).toEqual([]);
    // Definition of the grid: λ_j = λ_max · 0.2^(j/11).
    expectClose(path.lambdas[11]!, 0.2 * path.lambdaMax, { rtol: 1e-12 });
    expect(path.models.every((m) => m.converged)).toBe(true);
  });

  it('grows the number of active blocks and their ranks as λ falls', () => {
    // Invented planted problem: by 0.2 λ_max noise blocks have entered too, so the check below has teeth.
    expect(path.models.at(-1)!.activeBlocks.length).toBeGreaterThan(4);
    for (let j = 1; j < path.models.length; j++) {
      const prev = path.models[j - 1]!;
      const cur = path.models[j]!;
      // Tomioka & Aihara 2007 / REFERENCES.md §4: a larger λ gives fewer active blocks and lower ranks
      // (not a theorem along a path, but expected on a clean planted problem).
      expect(cur.activeBlocks.length).toBeGreaterThanOrEqual(prev.activeBlocks.length);
      expect(cur.ranks.reduce((a, b) => a + b, 0)).toBeGreaterThanOrEqual(prev.ranks.reduce((a, b) => a + b, 0));
      // Beck & Teboulle 2009b (MFISTA is monotone) and the path is warm-started: objective at the
      // optimum decreases as λ decreases (F is increasing in λ for fixed W).
      expect(cur.objective).toBeLessThanOrEqual(prev.objective);
    }
  });

  it('recovers the planted blocks with rank 1 and their row and column profiles', () => {
    const first = path.models.find((m) => m.activeBlocks.length > 0)!;
    // Invented planted problem: the first blocks to enter are the planted ones.
    expect(PLANTED).toEqual(expect.arrayContaining(first.activeBlocks));
    const m = path.models.find((mm) => PLANTED.every((k) => mm.activeBlocks.includes(k)))!;
    expect(m).toBeDefined();
    for (const k of PLANTED) {
      // Planted rank-1 signal: the block's weight is rank 1 while only the planted blocks are active.
      expect(m.ranks[k]).toBe(1);
      const f = blockFactors(m, k);
      const cosU = Math.abs(f.left[0]!.reduce((a, x, r) => a + x * U[r]!, 0));
      const cosV = Math.abs(f.right[0]!.reduce((a, x, q) => a + x * V[q]!, 0));
      // Planted profiles u and v are unit vectors; recovery within noise (per-entry signal 0.15
      // against unit noise), |cos| > 0.9.
      expect(cosU).toBeGreaterThan(0.9);
      expect(cosV).toBeGreaterThan(0.9);
    }
  });

  it('drops a heavily weighted block first', () => {
    const w = new Float64Array(10).fill(1);
    w[PLANTED[0]!] = 3;
    const weighted = traceNormPath(features, labels, { count: 6, minRatio: 0.5, blockWeights: w });
    const firstActive = weighted.models.find((mm) => mm.activeBlocks.length > 0)!;
    // DESIGN.md §6 (w_k multiplies block k's penalty): the penalised planted block enters after the other.
    expect(firstActive.activeBlocks).toEqual([PLANTED[1]]);
  });

  it('fits explicit λ values in decreasing order and rejects a bad grid', () => {
    const p = traceNormPath(features, labels, { lambdas: [0.5 * path.lambdaMax, path.lambdaMax] });
    // Definition of the path: fitted from large to small λ.
    expect(Array.from(p.lambdas)).toEqual([path.lambdaMax, 0.5 * path.lambdaMax]);
    // Common practice: λ must be finite and ≥ 0.
    expect(() => traceNormPath(features, labels, { lambdas: [-1] })).toThrow(ParamError);
    expect(() => traceNormPath(features, labels, { count: 0 })).toThrow(ParamError);
  });
});
