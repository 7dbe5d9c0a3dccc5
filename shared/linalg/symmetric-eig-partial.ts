/**
 * The eigenpairs of a dense symmetric matrix whose eigenvalues lie outside [−τ, τ], without
 * computing the others' eigenvectors: what eigenvalue soft-thresholding (the trace-norm prox of
 * a symmetric matrix) needs when the result has low rank.
 *
 * Method (the LAPACK dsytrd + dsterf + dstein route; Golub & Van Loan, Matrix Computations,
 * 4th ed., §8.3.1 and §8.2.2 / §8.4):
 *  1. Householder tridiagonalisation A = Q T Qᵀ, Q = H₀H₁⋯H_{n−3} (Alg. 8.3.1), ≈ (4/3)n³
 *     multiply-adds in the symmetric rank-2 updates; the reflectors are kept, Q is not formed.
 *  2. The eigenvalues beyond ±τ: Sturm counts at ±τ give how many; up to 8 are found by
 *     bisection (LAPACK dstebz; GVL §8.4.2), O(n) per step; otherwise all eigenvalues by
 *     implicit QL without vectors (EISPACK tql1; tridiagonal-eig.ts), O(n²).
 *  3. For each eigenvalue with |μ| > τ, its eigenvector of T by inverse iteration on the
 *     pivoted LU of T − μI (LAPACK dstein: start vector pseudo-random in (−1, 1), scaling to
 *     avoid overflow, zero pivots perturbed to ε‖T‖₁, converged once the solution's largest
 *     entry exceeds sqrt(0.1/n) after scaling, plus two extra steps; eigenvalues closer than
 *     10ε|μ| are separated by that amount, and vectors of eigenvalues closer than 10⁻³‖T‖₁ are
 *     re-orthogonalised by modified Gram-Schmidt at every step), O(n) per step.
 *  4. Back-transformation x = Q z by the stored reflectors, O(n²) per vector.
 * For n = 64 and a handful of selected pairs this is about six times faster than the full
 * decomposition (tridiagonal-eig.ts), which forms Q and rotates all n eigenvectors.
 */
import { tridiagonalQl } from './tridiagonal-eig';

const EPS = 2.220446049250313e-16;

/** Buffers of {@link eigenpairsBeyond} for n×n matrices; results are read from it. */
export interface PartialEigWorkspace {
  n: number;
  /** All eigenvalues, ascending, after a call that computed them (valuesValid). */
  values: Float64Array; // [n]
  /** True when `values` holds all eigenvalues (τ = Infinity, or more than a few beyond τ). */
  valuesValid: boolean;
  gl: number; gu: number; pivmin: number; tnorm: number;
  /** Number of selected pairs (|μ| > τ) after a call. */
  count: number;
  /** Selected eigenvalues in ascending order: selected[0 .. count). */
  selected: Float64Array; // [n]
  /** Selected unit eigenvectors as rows: vector j at vectors[j*n .. j*n + n). */
  vectors: Float64Array; // [n][n]
  a: Float64Array; hv: Float64Array; beta: Float64Array; d: Float64Array; e: Float64Array;
  p: Float64Array; dd: Float64Array; du: Float64Array; dl: Float64Array; du2: Float64Array; swap: Uint8Array; b: Float64Array;
}

/** Allocates the buffers of {@link eigenpairsBeyond}. */
export function createPartialEigWorkspace(n: number): PartialEigWorkspace {
  const f = () => new Float64Array(n);
  return { n, values: f(), valuesValid: false, gl: 0, gu: 0, pivmin: 0, tnorm: 0, count: 0, selected: f(), vectors: new Float64Array(n * n), a: new Float64Array(n * n), hv: new Float64Array(n * n),
           beta: f(), d: f(), e: f(), p: f(), dd: f(), du: f(), dl: f(), du2: f(), swap: new Uint8Array(n), b: f() };
}

/**
 * Eigenpairs with |μ| > τ of the symmetric n×n block m[offset .. offset + n²) (row-major; only
 * the lower triangle is read), by the method of the module comment. No allocation, no input
 * checks (callers validate finiteness). With τ = Infinity only the eigenvalues are computed, all
 * of them (ws.values, ascending).
 * @returns the number of selected pairs (also ws.count)
 */
export function eigenpairsBeyond(m: Float64Array, offset: number, tau: number, ws: PartialEigWorkspace): number {
  const { n, values } = ws;
  tridiagonalize(m, offset, ws);
  let count = 0;
  ws.valuesValid = false;
  if (tau !== Infinity) {
    // Sturm counts tell how many eigenvalues lie outside [−τ, τ]; few of them are cheaper by
    // bisection (O(n) per step) than all n by QL (≈ 30n² per matrix).
    const below = sturmCount(ws, -tau);
    const above = n - sturmCount(ws, tau);
    if (below + above <= BISECT_MAX) {
      for (let j = 0; j < below; j++) ws.selected[count++] = bisect(ws, j);
      for (let j = n - above; j < n; j++) ws.selected[count++] = bisect(ws, j);
      let kept = 0; // drop a value that rounding put inside [−τ, τ]
      for (let j = 0; j < count; j++) if (Math.abs(ws.selected[j]!) > tau) ws.selected[kept++] = ws.selected[j]!;
      ws.count = kept;
      if (kept > 0) inverseIteration(ws);
      return kept;
    }
  }
  values.set(ws.d);
  ws.p.set(ws.e);
  tridiagonalQl(values, ws.p, n, null);
  ws.valuesValid = true;
  for (let j = 0; j < n; j++) if (Math.abs(values[j]!) > tau) ws.selected[count++] = values[j]!;
  ws.count = count;
  if (count > 0) inverseIteration(ws);
  return count;
}

/** Above this many selected eigenvalues, QL computes them all instead of bisection. */
const BISECT_MAX = 8;

/**
 * Number of eigenvalues of T below x, from the signs of the LDLᵀ pivots of T − xI (Sturm
 * sequence; GVL §8.4.2, with LAPACK dlaebz's guard: a pivot smaller than `pivmin` is set to −pivmin).
 */
function sturmCount(ws: PartialEigWorkspace, x: number): number {
  const { n, d, e } = ws;
  const pivmin = ws.pivmin;
  let q = d[0]! - x;
  if (Math.abs(q) < pivmin) q = -pivmin;
  let c = q <= 0 ? 1 : 0;
  for (let i = 1; i < n; i++) {
    q = d[i]! - x - (e[i]! * e[i]!) / q;
    if (Math.abs(q) < pivmin) q = -pivmin;
    if (q <= 0) c++;
  }
  return c;
}

/**
 * Eigenvalue j (0-based, ascending) of T by bisection inside the Gershgorin interval, to the
 * width 2ε·max|bound| + ε‖T‖ + pivmin (LAPACK dstebz's default absolute tolerance plus a
 * relative term).
 */
function bisect(ws: PartialEigWorkspace, j: number): number {
  let lo = ws.gl;
  let hi = ws.gu;
  for (let it = 0; it < 200; it++) {
    const mid = 0.5 * (lo + hi);
    if (hi - lo <= 2 * EPS * Math.max(Math.abs(lo), Math.abs(hi)) + EPS * ws.tnorm + ws.pivmin || mid === lo || mid === hi) break;
    if (sturmCount(ws, mid) > j) hi = mid; else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/** Step 1: T in (ws.d, ws.e[1..]), reflector k (entries k+1..n−1) in ws.hv[k*n ..], β_k in ws.beta. */
function tridiagonalize(m: Float64Array, offset: number, ws: PartialEigWorkspace): void {
  const { n, a, hv, beta, d, e, p } = ws;
  for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) a[i * n + j] = m[offset + i * n + j]!;
  e[0] = 0;
  for (let k = 0; k < n - 2; k++) {
    // Reflector H = I − β v vᵀ with H x = α e₁ for x = a[k+1.., k], v = x − α e₁, α = −sign(x₀)‖x‖.
    let sq = 0;
    for (let i = k + 1; i < n; i++) sq += a[i * n + k]! ** 2;
    const x0 = a[(k + 1) * n + k]!;
    const o = k * n;
    if (sq === x0 * x0) { // nothing below the sub-diagonal: H = I
      beta[k] = 0;
      e[k + 1] = x0;
      continue;
    }
    const alpha = x0 > 0 ? -Math.sqrt(sq) : Math.sqrt(sq);
    hv[o + k + 1] = x0 - alpha;
    for (let i = k + 2; i < n; i++) hv[o + i] = a[i * n + k]!;
    let vv = 0;
    for (let i = k + 1; i < n; i++) vv += hv[o + i]! ** 2;
    const bk = 2 / vv;
    beta[k] = bk;
    e[k + 1] = alpha;
    // Trailing block B ← H B H = B − v wᵀ − w vᵀ with p = β B v, w = p − (β pᵀv/2) v, on the
    // lower triangle only (GVL Alg. 8.3.1); p = B v from the lower triangle by row-wise passes
    // that add each off-diagonal entry's contribution to both p_i and p_j.
    for (let i = k + 1; i < n; i++) p[i] = 0;
    for (let i = k + 1; i < n; i++) {
      const r = i * n;
      const vi = hv[o + i]!;
      let acc = a[r + i]! * vi;
      for (let j = k + 1; j < i; j++) {
        const x = a[r + j]!;
        acc += x * hv[o + j]!;
        p[j] = p[j]! + x * vi;
      }
      p[i] = p[i]! + acc;
    }
    let pv = 0;
    for (let i = k + 1; i < n; i++) { p[i] = bk * p[i]!; pv += p[i]! * hv[o + i]!; }
    const kk = 0.5 * bk * pv;
    for (let i = k + 1; i < n; i++) p[i] = p[i]! - kk * hv[o + i]!;
    for (let i = k + 1; i < n; i++) {
      const vi = hv[o + i]!;
      const wi = p[i]!;
      const r = i * n;
      for (let j = k + 1; j <= i; j++) a[r + j] = a[r + j]! - vi * p[j]! - wi * hv[o + j]!;
    }
  }
  if (n >= 2) e[n - 1] = a[(n - 1) * n + n - 2]!;
  for (let i = 0; i < n; i++) d[i] = a[i * n + i]!;
  // Gershgorin interval of T and the smallest admissible Sturm pivot (LAPACK dstebz).
  let gl = Infinity;
  let gu = -Infinity;
  let emax = 0;
  for (let i = 0; i < n; i++) {
    const r = (i > 0 ? Math.abs(e[i]!) : 0) + (i + 1 < n ? Math.abs(e[i + 1]!) : 0);
    gl = Math.min(gl, d[i]! - r);
    gu = Math.max(gu, d[i]! + r);
    if (i > 0) emax = Math.max(emax, e[i]! * e[i]!);
  }
  const spread = Math.max(Math.abs(gl), Math.abs(gu));
  ws.gl = gl - 2 * EPS * spread * n - Number.MIN_VALUE;
  ws.gu = gu + 2 * EPS * spread * n + Number.MIN_VALUE;
  ws.pivmin = 2.2250738585072014e-308 * Math.max(1, emax);
  ws.tnorm = spread;
}

/** Steps 3-4 for ws.selected[0 .. count) (ascending). */
function inverseIteration(ws: PartialEigWorkspace): void {
  const { n, d, e, dd, du, dl, du2, swap, b, vectors, selected, count, hv, beta } = ws;
  let norm1 = 0;
  for (let i = 0; i < n; i++) norm1 = Math.max(norm1, Math.abs(d[i]!) + (i > 0 ? Math.abs(e[i]!) : 0) + (i + 1 < n ? Math.abs(e[i + 1]!) : 0));
  const ortol = 1e-3 * norm1;
  const crit = Math.sqrt(0.1 / n);
  const tiny = EPS * norm1 || Number.MIN_VALUE;
  let clusterStart = 0;
  let prev = -Infinity;
  let seed = 1;
  for (let j = 0; j < count; j++) {
    let mu = selected[j]!;
    if (j > 0 && mu - prev < 10 * EPS * Math.abs(mu)) mu = prev + 10 * EPS * Math.abs(mu);
    if (j === 0 || mu - prev > ortol) clusterStart = j;
    prev = mu;
    // Pivoted LU of T − μI (LAPACK dgttrf): rows i: dl[i] (below), dd[i], du[i], du2[i].
    for (let i = 0; i < n; i++) { dd[i] = d[i]! - mu; du[i] = i + 1 < n ? e[i + 1]! : 0; dl[i] = du[i]!; du2[i] = 0; swap[i] = 0; }
    for (let i = 0; i < n - 1; i++) {
      if (Math.abs(dd[i]!) >= Math.abs(dl[i]!)) {
        if (dd[i] !== 0) { const f = dl[i]! / dd[i]!; dl[i] = f; dd[i + 1] = dd[i + 1]! - f * du[i]!; }
      } else {
        const f = dd[i]! / dl[i]!;
        dd[i] = dl[i]!;
        dl[i] = f;
        const t = du[i]!;
        du[i] = dd[i + 1]!;
        dd[i + 1] = t - f * dd[i + 1]!;
        if (i + 2 < n) { du2[i] = du[i + 1]!; du[i + 1] = -f * du[i + 1]!; }
        swap[i] = 1;
      }
    }
    for (let i = 0; i < n; i++) if (Math.abs(dd[i]!) < tiny) dd[i] = dd[i]! < 0 ? -tiny : tiny;
    // Start vector: pseudo-random in (−1, 1), deterministic (xorshift32).
    for (let i = 0; i < n; i++) {
      seed ^= seed << 13; seed ^= seed >>> 17; seed ^= seed << 5;
      b[i] = ((seed >>> 0) / 4294967296) * 2 - 1;
    }
    let extra = 0;
    for (let it = 0; it < 8; it++) {
      let s1 = 0;
      for (let i = 0; i < n; i++) s1 += Math.abs(b[i]!);
      const scl = (n * norm1 * Math.max(EPS, Math.abs(dd[n - 1]!))) / s1;
      for (let i = 0; i < n; i++) b[i] = b[i]! * scl;
      for (let i = 0; i < n - 1; i++) {
        if (swap[i] === 0) b[i + 1] = b[i + 1]! - dl[i]! * b[i]!;
        else { const t = b[i]!; b[i] = b[i + 1]!; b[i + 1] = t - dl[i]! * b[i]!; }
      }
      b[n - 1] = b[n - 1]! / dd[n - 1]!;
      if (n >= 2) b[n - 2] = (b[n - 2]! - du[n - 2]! * b[n - 1]!) / dd[n - 2]!;
      for (let i = n - 3; i >= 0; i--) b[i] = (b[i]! - du[i]! * b[i + 1]! - du2[i]! * b[i + 2]!) / dd[i]!;
      for (let q = clusterStart; q < j; q++) { // modified Gram-Schmidt against the cluster's vectors (of T)
        const o = q * n;
        let dot = 0;
        for (let i = 0; i < n; i++) dot += b[i]! * vectors[o + i]!;
        for (let i = 0; i < n; i++) b[i] = b[i]! - dot * vectors[o + i]!;
      }
      let big = 0;
      for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(b[i]!));
      if (big >= crit && ++extra > 2) break;
    }
    let s2 = 0;
    for (let i = 0; i < n; i++) s2 += b[i]! * b[i]!;
    const inv = 1 / Math.sqrt(s2);
    const o = j * n;
    for (let i = 0; i < n; i++) vectors[o + i] = b[i]! * inv;
  }
  // Step 4, after all vectors of T are known (the Gram-Schmidt above works in T's basis).
  for (let j = 0; j < count; j++) {
    const o = j * n;
    for (let k = n - 3; k >= 0; k--) {
      const bk = beta[k]!;
      if (bk === 0) continue;
      const h = k * n;
      let s = 0;
      for (let i = k + 1; i < n; i++) s += hv[h + i]! * vectors[o + i]!;
      s *= bk;
      for (let i = k + 1; i < n; i++) vectors[o + i] = vectors[o + i]! - s * hv[h + i]!;
    }
  }
}
