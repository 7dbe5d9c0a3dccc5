/**
 * Amari performance index of a separation (Amari, Cichocki & Yang 1996, "A new learning
 * algorithm for blind signal separation", NIPS 8, pp. 757–763), for P = W·A (estimated unmixing
 * times true mixing, n×n):
 *   E(P) = Σ_i (Σ_j |p_ij| / max_k |p_ik| − 1) + Σ_j (Σ_i |p_ij| / max_k |p_kj| − 1).
 * E = 0 exactly when P is a scaled permutation (perfect separation up to order, sign and scale).
 * Normalised form Ē = E / (2n(n − 1)) ∈ [0, 1] (a common convention, REFERENCES.md §3 [cp]).
 */
import { ParamError, ShapeError } from '../types';

/**
 * @param p square n×n matrix as rows
 * @param normalised divide by 2n(n − 1) (default true); for n = 1 the index is 0
 * @throws ShapeError if p is not square; ParamError if a row or column is all zero
 */
export function amariIndex(p: ReadonlyArray<ArrayLike<number>>, normalised = true): number {
  const n = p.length;
  if (n < 1) throw new ShapeError('p', 'expected a non-empty square matrix');
  p.forEach((row, i) => {
    if (row.length !== n) throw new ShapeError('p', `expected ${n}×${n}, row ${i} has ${row.length} entries`);
  });
  const abs = (i: number, j: number) => Math.abs(p[i]![j]!);
  let e = 0;
  for (let i = 0; i < n; i++) {
    let sum = 0;
    let max = 0;
    for (let j = 0; j < n; j++) { sum += abs(i, j); max = Math.max(max, abs(i, j)); }
    if (!(max > 0)) throw new ParamError('p', `row ${i} is all zero (or NaN)`);
    e += sum / max - 1;
  }
  for (let j = 0; j < n; j++) {
    let sum = 0;
    let max = 0;
    for (let i = 0; i < n; i++) { sum += abs(i, j); max = Math.max(max, abs(i, j)); }
    if (!(max > 0)) throw new ParamError('p', `column ${j} is all zero (or NaN)`);
    e += sum / max - 1;
  }
  if (!normalised) return e;
  return n === 1 ? 0 : e / (2 * n * (n - 1));
}
