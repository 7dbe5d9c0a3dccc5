/**
 * Independent component analysis of multichannel EEG: centring, PCA whitening with rank
 * reduction (whitening.ts), then extended Infomax (Lee, Girolami & Sejnowski 1999; infomax.ts)
 * or symmetric FastICA (Hyvärinen 1999; fastica.ts). Deterministic for a seed.
 *
 * Conventions of the fitted result:
 * - unmixing U = W·W_pca maps centred data to components: s = U (x − mean).
 * - mixing A = W_pca⁺·W⁻¹ is U's pseudo-inverse (U A = I); its columns are the scalp maps.
 * - scale: each component has unit variance on the training data, so a map is in the data's
 *   unit (µV) per unit of component.
 * - order: by the explained variance of the component's back-projection, largest first:
 *   explainedVariance_j = ‖a_j‖² var(s_j) / Σ_c var(x_c) = ‖a_j‖² / total variance. The maps
 *   are not orthogonal, so these fractions need not add up to the PCA-retained fraction.
 * - sign: the entry of largest magnitude of each map is positive.
 * - kurtosisSigns_j = sign(E{sech² s_j}E{s_j²} − E{s_j tanh s_j}) on the training components,
 *   the extended-Infomax switching statistic (+1 super-Gaussian, −1 sub-Gaussian), for both methods.
 */
import { Matrix, inverse } from 'ml-matrix';
import { createRng } from '../linalg/random';
import { type ChannelMajor, ParamError, ShapeError } from '../types';
import { fastIca } from './fastica';
import { extendedInfomax } from './infomax';
import { pcaWhiten } from './whitening';

export { fromArtifact, toArtifact, type IcaArtifact } from './artifact';

export type IcaMethod = 'extended-infomax' | 'fastica';

/** Hyperparameters of an ICA fit. */
export interface IcaParams {
  /** Number of components m (PCA rank reduction to m first); 1 ≤ m ≤ channels. */
  nComponents: number;
  method: IcaMethod;
  /** Seeds the sample order (Infomax) or the starting matrix (FastICA); integer in [0, 2^32). */
  seed: number;
  /** Epochs (Infomax, default 200) or fixed-point iterations (FastICA, default 400). */
  maxIter?: number;
  /**
   * Stopping tolerance: relative change of the epoch-averaged W between epochs (Infomax,
   * default 1e-3) or max_i | |⟨w_i⁺, w_i⟩| − 1 | (FastICA, default 1e-6).
   */
  tol?: number;
  /** Infomax initial learning rate on the block-mean natural gradient (default 0.2). */
  learningRate?: number;
}

/** What ICA learned. Arrays are Float64Array rows; see the module comment for conventions. */
export interface FittedIca {
  method: IcaMethod;
  mean: Float64Array; // [chan]
  unmixing: Float64Array[]; // [comp][chan], applied to centred data
  mixing: Float64Array[]; // [chan][comp], columns are scalp maps
  explainedVariance: Float64Array; // [comp], fraction of total variance
  kurtosisSigns: Int8Array; // [comp], +1 super-Gaussian, −1 sub-Gaussian
  iterations: number;
  converged: boolean;
}

/**
 * Fits ICA (see module comment). The input is not modified.
 * @param x [channel][sample], any unit (µV for EEG)
 */
export function fitIca(x: ChannelMajor, params: IcaParams): FittedIca {
  const { nComponents: m, method, seed } = params;
  if (method !== 'extended-infomax' && method !== 'fastica') {
    throw new ParamError('method', `expected 'extended-infomax' or 'fastica', got ${String(method)}`);
  }
  const maxIter = params.maxIter ?? (method === 'fastica' ? 400 : 200);
  const tol = params.tol ?? (method === 'fastica' ? 1e-6 : 1e-3);
  const learningRate = params.learningRate ?? 0.2;
  if (!Number.isInteger(maxIter) || maxIter < 1) throw new ParamError('maxIter', `expected an integer ≥ 1, got ${maxIter}`);
  if (!(tol > 0)) throw new ParamError('tol', `expected a value > 0, got ${tol}`);
  if (!(learningRate > 0) || !Number.isFinite(learningRate)) throw new ParamError('learningRate', `expected a finite value > 0, got ${learningRate}`);
  const rng = createRng(seed);
  const wh = pcaWhiten(x, m);
  const n = wh.nSamples;
  const run = method === 'fastica'
    ? fastIca(wh.z, n, m, { maxIter, tol }, rng)
    : extendedInfomax(wh.z, n, m, { maxIter, tol, learningRate, blockSize: defaultBlockSize(n) }, rng);
  const w = run.w;
  const c = wh.nChannels;

  // Unit-variance components: cov(z) = I, so var(s_j) = ‖w_j‖².
  const scale = Float64Array.from({ length: m }, (_, j) => Math.hypot(...w.subarray(j * m, (j + 1) * m)));
  const wInv = inverse(new Matrix(Array.from({ length: m }, (_, i) => Array.from(w.subarray(i * m, (i + 1) * m)))));
  const unmix = Array.from({ length: m }, (_, j) => {
    const row = new Float64Array(c);
    for (let l = 0; l < m; l++) {
      const coef = w[j * m + l]! / scale[j]!;
      for (let ch = 0; ch < c; ch++) row[ch]! += coef * wh.whitening[l * c + ch]!;
    }
    return row;
  });
  const maps = Array.from({ length: m }, (_, j) => {
    const col = new Float64Array(c);
    for (let ch = 0; ch < c; ch++) {
      let acc = 0;
      for (let l = 0; l < m; l++) acc += wh.dewhitening[ch * m + l]! * wInv.get(l, j);
      col[ch] = acc * scale[j]!;
    }
    return col;
  });
  const ev = maps.map((a) => a.reduce((s, v) => s + v * v, 0) / wh.totalVariance);
  const order = ev.map((_, j) => j).sort((i, j) => ev[j]! - ev[i]! || i - j);
  const signFlip = order.map((j) => (largestMagnitude(maps[j]!) < 0 ? -1 : 1));
  const unmixing = order.map((j, r) => unmix[j]!.map((v) => v * signFlip[r]!));
  const mapsSorted = order.map((j, r) => maps[j]!.map((v) => v * signFlip[r]!));
  const mixing = Array.from({ length: c }, (_, ch) => Float64Array.from({ length: m }, (_, r) => mapsSorted[r]![ch]!));
  // Component r's whitened-space row: w_j / scale_j with sign; used for the kurtosis statistic.
  const rows = order.map((j, r) => Float64Array.from(w.subarray(j * m, (j + 1) * m), (v) => (v / scale[j]!) * signFlip[r]!));
  return {
    method,
    mean: wh.mean,
    unmixing,
    mixing,
    explainedVariance: Float64Array.from(order, (j) => ev[j]!),
    kurtosisSigns: switchingSigns(wh.z, n, m, rows),
    iterations: run.iterations,
    converged: run.converged,
  };
}

/** Infomax block size: about √N samples, kept within [32, 512] (our choice; see bench/solver.ts). */
function defaultBlockSize(n: number): number {
  return Math.min(n, Math.max(32, Math.min(512, Math.round(Math.sqrt(n)))));
}

function largestMagnitude(a: Float64Array): number {
  let big = 0;
  for (const v of a) if (Math.abs(v) > Math.abs(big)) big = v;
  return big;
}

/** sign(E{sech² s}E{s²} − E{s tanh s}) per component s = row · z. */
function switchingSigns(z: Float64Array, n: number, m: number, rows: Float64Array[]): Int8Array {
  return Int8Array.from(rows, (row) => {
    let sech = 0;
    let sq = 0;
    let st = 0;
    for (let t = 0; t < n; t++) {
      let s = 0;
      for (let l = 0; l < m; l++) s += row[l]! * z[t * m + l]!;
      const th = Math.tanh(s);
      sech += 1 - th * th;
      sq += s * s;
      st += s * th;
    }
    return sech * sq / n - st >= 0 ? 1 : -1;
  });
}

/**
 * Components of new data: s_j = U_j (x − mean) for the chosen components.
 * @param x [channel][sample] with the fitted channel count and order; not modified
 * @param components indices into the fitted components (default all, in order)
 * @returns [component][sample]
 */
export function applyUnmixing(fitted: FittedIca, x: ChannelMajor, components?: number[]): ChannelMajor {
  const c = fitted.mean.length;
  if (x.length !== c) throw new ShapeError('x', `expected ${c} channels, got ${x.length}`);
  const n = x[0]!.length;
  x.forEach((row, ch) => {
    if (row.length !== n) throw new ShapeError('x', `channel ${ch} has ${row.length} samples, channel 0 has ${n}`);
  });
  const picks = components ?? fitted.unmixing.map((_, j) => j);
  return picks.map((j) => {
    const u = fitted.unmixing[j];
    if (u === undefined || !Number.isInteger(j)) throw new ParamError('components', `index ${j} is not in [0, ${fitted.unmixing.length})`);
    const out = new Float64Array(n);
    let offset = 0;
    for (let ch = 0; ch < c; ch++) {
      const coef = u[ch]!;
      if (coef === 0) continue;
      offset += coef * fitted.mean[ch]!;
      const src = x[ch]!;
      for (let t = 0; t < n; t++) out[t]! += coef * src[t]!;
    }
    for (let t = 0; t < n; t++) out[t]! -= offset;
    return out;
  });
}
