/**
 * FastICA, symmetric (parallel) version with the logcosh contrast, on whitened data
 * (Hyvärinen 1999, "Fast and robust fixed-point algorithms for independent component
 * analysis", IEEE Trans. Neural Networks 10(3):626–634; REFERENCES.md §3):
 *   W⁺ = E{g(W z) zᵀ} − diag(E{g′(W z)}) W,  g(u) = tanh(u), g′(u) = 1 − tanh²(u)  (a = 1),
 *   W ← (W⁺ W⁺ᵀ)^(−1/2) W⁺   (symmetric decorrelation).
 * Start: a seeded standard-normal W, decorrelated. Stopping rule (as REFERENCES.md §3 quotes
 * for scikit-learn): converged when max_i | |⟨w_i⁺, w_i⟩| − 1 | < tol; otherwise at maxIter.
 *
 * Stabilisation: on real EEG the plain symmetric iteration can wander without converging (seen
 * on eegmmidb S003R04 and S005R04: no convergence in 1000 iterations, even at tol 1e-4). After
 * 20 plain iterations the row update becomes the stabilised fixed point of Hyvärinen 1999
 * (its "stabilized" variant; section number [mem]):
 *   w_i⁺ = w_i − μ (E{z g(u_i)} − β_i w_i) / (E{g′(u_i)} − β_i),  β_i = E{u_i g(u_i)},
 * with μ = 0.5, halved every 50 iterations down to 1/16, followed by the same decorrelation.
 * With it those recordings converge in 80–250 iterations; problems that converge within 20
 * iterations (such as REFERENCES.md §3) are unaffected.
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
  const chunk = Math.min(nSamples, 256);
  const zb = new Float64Array(m * chunk);
  const g = new Float64Array(m * chunk);
  for (let it = 1; it <= s.maxIter; it++) {
    egz.fill(0);
    egp.fill(0);
    // E{g(Wz) zᵀ} and E{g'(Wz)} over all samples, in chunks laid out component-major.
    for (let t0 = 0; t0 < nSamples; t0 += chunk) {
      const b = Math.min(chunk, nSamples - t0);
      for (let r = 0; r < b; r++) {
        const zo = (t0 + r) * m;
        for (let c = 0; c < m; c++) zb[c * chunk + r] = z[zo + c]!;
      }
      for (let i = 0; i < m; i++) {
        const go = i * chunk;
        g.fill(0, go, go + b);
        for (let c = 0; c < m; c++) {
          const coef = w[i * m + c]!;
          const zo = c * chunk;
          for (let r = 0; r < b; r++) g[go + r]! += coef * zb[zo + r]!;
        }
        let gp = 0;
        for (let r = 0; r < b; r++) {
          const th = Math.tanh(g[go + r]!);
          g[go + r] = th;
          gp += 1 - th * th;
        }
        egp[i]! += gp;
        for (let c = 0; c < m; c++) {
          const zo = c * chunk;
          let acc = 0;
          for (let r = 0; r < b; r++) acc += g[go + r]! * zb[zo + r]!;
          egz[i * m + c]! += acc;
        }
      }
    }
    const next = new Float64Array(m * m);
    const mu = stabilisationStep(it);
    for (let i = 0; i < m; i++) {
      if (mu === 1) {
        for (let c = 0; c < m; c++) next[i * m + c] = (egz[i * m + c]! - egp[i]! * w[i * m + c]!) / nSamples;
      } else {
        let beta = 0;
        for (let c = 0; c < m; c++) beta += w[i * m + c]! * egz[i * m + c]!;
        beta /= nSamples;
        const denom = egp[i]! / nSamples - beta;
        for (let c = 0; c < m; c++) next[i * m + c] = w[i * m + c]! - mu * (egz[i * m + c]! / nSamples - beta * w[i * m + c]!) / denom;
      }
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

/** μ = 1 (plain fixed point) for 20 iterations, then 0.5, halved every 50 iterations, floor 1/16. */
function stabilisationStep(it: number): number {
  return it <= 20 ? 1 : Math.max(1 / 16, 0.5 ** (1 + Math.floor((it - 20) / 50)));
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
