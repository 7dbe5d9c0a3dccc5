/**
 * Extended Infomax ICA on whitened data (Lee, Girolami & Sejnowski 1999, Neural Computation
 * 11(2):417–441; Infomax: Bell & Sejnowski 1995, Neural Computation 7(6):1129–1159), with the
 * natural gradient (Amari, Cichocki & Yang 1996):
 *   u = W z,  ΔW = η [I − K tanh(u)uᵀ − u uᵀ] W,  K = diag(k_i),
 *   k_i = sign(E{sech² u_i} E{u_i²} − E{u_i tanh u_i})   (+1 super-, −1 sub-Gaussian),
 * with the expectations replaced by means over mini-batches ("blocks") of samples.
 *
 * Schedule (ours; the cited papers leave it open; chosen on the REFERENCES.md §3 mixture, a
 * 64-channel synthetic mixture and real EEG, see bench/solver.ts):
 * - W starts at I (the data are already white); k starts from the statistic at W = I.
 * - One epoch = every sample once, in an order drawn from the seeded generator, in blocks of
 *   `blockSize`; k is re-estimated at the end of each epoch from statistics gathered during it.
 * - Iterate averaging (Polyak & Juditsky 1992, SIAM J. Control Optim. 30(4):838–855): W̄_e is
 *   the mean of W after each block of epoch e; it is far less noisy than W itself and is
 *   what the fit returns.
 * - Annealing: δ_e = ‖W̄_e − W̄_{e−1}‖_F / ‖W̄_e‖_F (W̄_0 = I). When the weight change grows
 *   (δ_e > δ_{e−1}) the learning rate is halved.
 * - Stopping rule: converged when δ_e < tol; otherwise stop after maxIter epochs.
 * - Divergence guard: a non-finite or exploding W restarts from I with η halved (at most 8 times).
 */
import type { Rng } from '../linalg/random';
import { ParamError } from '../types';

/** Settings for {@link extendedInfomax}. */
export interface InfomaxSettings {
  maxIter: number;
  tol: number;
  learningRate: number;
  blockSize: number;
}

/** Unmixing W (m×m, row-major) of the whitened data and the run's bookkeeping. */
export interface InfomaxResult {
  w: Float64Array;
  signs: Int8Array;
  iterations: number;
  converged: boolean;
}

/**
 * Runs extended Infomax (see module comment) on z, sample-major [sample][comp].
 * @param rng advanced by one permutation per epoch
 */
export function extendedInfomax(z: Float64Array, nSamples: number, m: number, s: InfomaxSettings, rng: Rng): InfomaxResult {
  let eta = s.learningRate;
  const b = Math.max(1, Math.min(s.blockSize, nSamples));
  const nBlocks = Math.floor(nSamples / b);
  const w = new Float64Array(m * m);
  const wSum = new Float64Array(m * m);
  const wAvg = new Float64Array(m * m);
  const signs = new Int8Array(m);
  const work = {
    zb: new Float64Array(m * b), u: new Float64Array(m * b), y: new Float64Array(m * b),
    g: new Float64Array(m * m), gw: new Float64Array(m * m), stats: new Float64Array(3 * m),
  };
  const reset = () => {
    w.fill(0);
    wAvg.fill(0);
    for (let i = 0; i < m; i++) { w[i * m + i] = 1; wAvg[i * m + i] = 1; }
    initialSigns(z, nSamples, m, signs);
  };
  reset();
  let restarts = 0;
  let prevChange = Infinity;
  for (let epoch = 1; epoch <= s.maxIter; epoch++) {
    wSum.fill(0);
    work.stats.fill(0);
    const order = rng.permutation(nSamples);
    for (let blk = 0; blk < nBlocks; blk++) {
      blockStep(z, order, blk * b, b, m, w, signs, eta, work);
      for (let q = 0; q < m * m; q++) wSum[q]! += w[q]!;
    }
    let diff = 0;
    let norm = 0;
    for (let q = 0; q < m * m; q++) {
      const a = wSum[q]! / nBlocks;
      diff += (a - wAvg[q]!) ** 2;
      norm += a * a;
      wAvg[q] = a;
    }
    const change = Math.sqrt(diff / norm);
    if (!Number.isFinite(change) || norm > 1e8 * m) {
      if (++restarts > 8) throw new ParamError('learningRate', `extended Infomax diverged ${restarts} times; last rate ${eta}`);
      eta *= 0.5;
      reset();
      prevChange = Infinity;
      continue;
    }
    const { stats } = work;
    const used = nBlocks * b;
    for (let i = 0; i < m; i++) {
      const k = (stats[i]! * stats[m + i]!) / used - stats[2 * m + i]!;
      if (k !== 0) signs[i] = k > 0 ? 1 : -1;
    }
    if (change < s.tol) return { w: wAvg, signs, iterations: epoch, converged: true };
    if (change > prevChange) eta *= 0.5;
    prevChange = change;
  }
  return { w: wAvg, signs, iterations: s.maxIter, converged: false };
}

interface Work { zb: Float64Array; u: Float64Array; y: Float64Array; g: Float64Array; gw: Float64Array; stats: Float64Array }

/** One natural-gradient step on the block order[start .. start + b); updates w and the statistics. */
function blockStep(z: Float64Array, order: Uint32Array, start: number, b: number, m: number, w: Float64Array,
                   signs: Int8Array, eta: number, { zb, u, y, g, gw, stats }: Work): void {
  // Block as component-major b-vectors (long inner loops run fastest in JS engines).
  for (let r = 0; r < b; r++) {
    const zo = order[start + r]! * m;
    for (let c = 0; c < m; c++) zb[c * b + r] = z[zo + c]!;
  }
  // U = W Z_b;  Y = K tanh(U) + U;  switching statistics Σ sech²u, Σ u², Σ u tanh u.
  u.fill(0);
  for (let i = 0; i < m; i++) {
    const uo = i * b;
    for (let c = 0; c < m; c++) {
      const coef = w[i * m + c]!;
      const zo = c * b;
      for (let r = 0; r < b; r++) u[uo + r]! += coef * zb[zo + r]!;
    }
    const k = signs[i]!;
    let th2 = 0;
    let u2 = 0;
    let uth = 0;
    for (let r = 0; r < b; r++) {
      const ui = u[uo + r]!;
      const th = Math.tanh(ui);
      y[uo + r] = k * th + ui;
      th2 += th * th;
      u2 += ui * ui;
      uth += ui * th;
    }
    stats[i]! += b - th2;
    stats[m + i]! += u2;
    stats[2 * m + i]! += uth;
  }
  // G = I − Y Uᵀ / b;  W ← W + η G W.
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let dot = 0;
      for (let r = 0; r < b; r++) dot += y[i * b + r]! * u[j * b + r]!;
      g[i * m + j] = (i === j ? 1 : 0) - dot / b;
    }
  }
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let acc = 0;
      for (let l = 0; l < m; l++) acc += g[i * m + l]! * w[l * m + j]!;
      gw[i * m + j] = acc;
    }
  }
  for (let q = 0; q < m * m; q++) w[q]! += eta * gw[q]!;
}

/** k_i = sign(E{sech² z_i}E{z_i²} − E{z_i tanh z_i}) at W = I. */
function initialSigns(z: Float64Array, n: number, m: number, signs: Int8Array): void {
  for (let i = 0; i < m; i++) {
    let sech = 0;
    let sq = 0;
    let ut = 0;
    for (let t = 0; t < n; t++) {
      const v = z[t * m + i]!;
      const th = Math.tanh(v);
      sech += 1 - th * th;
      sq += v * v;
      ut += v * th;
    }
    signs[i] = (sech * sq) / n - ut >= 0 ? 1 : -1;
  }
}
