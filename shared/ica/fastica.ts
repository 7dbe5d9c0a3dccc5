/**
 * FastICA, symmetric (parallel) version with the logcosh contrast, on whitened data
 * (Hyvärinen 1999, "Fast and robust fixed-point algorithms for independent component
 * analysis", IEEE Trans. Neural Networks 10(3):626–634; REFERENCES.md §3):
 *   W⁺ = E{g(W z) zᵀ} − diag(E{g′(W z)}) W,  g(u) = tanh(u), g′(u) = 1 − tanh²(u)  (a = 1),
 *   W ← (W⁺ W⁺ᵀ)^(−1/2) W⁺   (symmetric decorrelation).
 * Start: a seeded standard-normal W, decorrelated. Stopping rule (as REFERENCES.md §3 quotes
 * for scikit-learn): converged when max_i | |⟨w_i⁺, w_i⟩| − 1 | < tol; otherwise at maxIter.
 */
import { inverseSqrtSpd } from '../linalg/symmetric-eig';
import type { Rng } from '../linalg/random';

/** Settings for {@link fastIca}. */
export interface FastIcaSettings {
  maxIter: number;
  tol: number;
}

/** Orthogonal unmixing W (m×m, row-major) of the whitened data and the run's bookkeeping. */
export interface FastIcaResult {
  w: Float64Array;
  iterations: number;
  converged: boolean;
}

/**
 * Runs symmetric FastICA (see module comment) on z, sample-major [sample][comp].
 * @param rng used for the m² starting values only
 */
export function fastIca(z: Float64Array, nSamples: number, m: number, s: FastIcaSettings, rng: Rng): FastIcaResult {
  let w = decorrelate(Float64Array.from({ length: m * m }, () => rng.nextNormal()), m);
  const egz = new Float64Array(m * m);
  const egp = new Float64Array(m);
  const u = new Float64Array(m);
  for (let it = 1; it <= s.maxIter; it++) {
    egz.fill(0);
    egp.fill(0);
    for (let t = 0; t < nSamples; t++) {
      const zo = t * m;
      for (let i = 0; i < m; i++) {
        let acc = 0;
        for (let c = 0; c < m; c++) acc += w[i * m + c]! * z[zo + c]!;
        const g = Math.tanh(acc);
        u[i] = g;
        egp[i]! += 1 - g * g;
      }
      for (let i = 0; i < m; i++) {
        const g = u[i]!;
        for (let c = 0; c < m; c++) egz[i * m + c]! += g * z[zo + c]!;
      }
    }
    const next = new Float64Array(m * m);
    for (let i = 0; i < m; i++) {
      for (let c = 0; c < m; c++) next[i * m + c] = (egz[i * m + c]! - egp[i]! * w[i * m + c]!) / nSamples;
    }
    const wNew = decorrelate(next, m);
    let lim = 0;
    for (let i = 0; i < m; i++) {
      let dot = 0;
      for (let c = 0; c < m; c++) dot += wNew[i * m + c]! * w[i * m + c]!;
      lim = Math.max(lim, Math.abs(Math.abs(dot) - 1));
    }
    w = wNew;
    if (lim < s.tol) return { w, iterations: it, converged: true };
  }
  return { w, iterations: s.maxIter, converged: false };
}

/** (W Wᵀ)^(−1/2) W: the orthogonal matrix nearest to W's row space (symmetric decorrelation). */
function decorrelate(w: Float64Array, m: number): Float64Array {
  const wwt = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    for (let j = i; j < m; j++) {
      let acc = 0;
      for (let c = 0; c < m; c++) acc += w[i * m + c]! * w[j * m + c]!;
      wwt[i * m + j] = acc;
      wwt[j * m + i] = acc;
    }
  }
  const r = inverseSqrtSpd(wwt, m);
  const out = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    for (let l = 0; l < m; l++) {
      const ril = r[i * m + l]!;
      for (let c = 0; c < m; c++) out[i * m + c]! += ril * w[l * m + c]!;
    }
  }
  return out;
}
