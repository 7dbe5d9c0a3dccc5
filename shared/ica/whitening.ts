/**
 * Centring and PCA whitening with rank reduction, the first step of both ICA methods
 * (Hyvärinen & Oja 2000, "Independent component analysis: algorithms and applications",
 * Neural Networks 13:411–430, §5.2): with the channel covariance C = E D Eᵀ (eigenvalues
 * descending), z = D_m^(−1/2) E_mᵀ (x − mean) keeps the m leading principal directions and has
 * identity covariance. Rank reduction drops directions with no variance (a flat channel, an
 * average reference) and the weakest noise directions.
 */
import { symmetricEig } from '../linalg/symmetric-eig';
import { type ChannelMajor, ParamError, ShapeError } from '../types';

/** Result of {@link pcaWhiten}. Matrices are row-major Float64Arrays. */
export interface Whitening {
  nChannels: number;
  nComponents: number;
  nSamples: number;
  /** Channel means, in the data's unit. */
  mean: Float64Array; // [chan]
  /** All eigenvalues of the channel covariance (unit²), descending. */
  eigenvalues: Float64Array; // [chan]
  /** Σ of the covariance diagonal: total variance of the centred data (unit²). */
  totalVariance: number;
  /** W_pca = D_m^(−1/2) E_mᵀ. */
  whitening: Float64Array; // [comp][chan]
  /** Its pseudo-inverse E_m D_m^(1/2). */
  dewhitening: Float64Array; // [chan][comp]
  /** Whitened data, sample-major: z[t * nComponents + j]. */
  z: Float64Array; // [sample][comp]
}

/** Eigenvalues at or below this fraction of the largest count as zero variance. */
export const RANK_TOLERANCE = 1e-10;

/**
 * Centres the channels, eigendecomposes the covariance (normalised by N − 1; cyclic Jacobi),
 * and whitens onto the m = nComponents leading principal directions.
 * @param x [channel][sample]; not modified
 * @throws ShapeError for ragged or too-short input; ParamError when the data have fewer than
 *   nComponents directions with variance above RANK_TOLERANCE × the largest, or contain NaN/±∞
 */
export function pcaWhiten(x: ChannelMajor, nComponents: number): Whitening {
  const nChannels = x.length;
  if (nChannels < 1) throw new ShapeError('x', 'expected at least one channel');
  const nSamples = x[0]!.length;
  x.forEach((row, c) => {
    if (row.length !== nSamples) throw new ShapeError('x', `channel ${c} has ${row.length} samples, channel 0 has ${nSamples}`);
  });
  if (!Number.isInteger(nComponents) || nComponents < 1 || nComponents > nChannels) {
    throw new ParamError('nComponents', `expected an integer in [1, ${nChannels}], got ${nComponents}`);
  }
  if (nSamples <= nComponents) throw new ShapeError('x', `expected more than ${nComponents} samples, got ${nSamples}`);

  const mean = new Float64Array(nChannels);
  const xc = x.map((row, c) => {
    let s = 0;
    for (let t = 0; t < nSamples; t++) {
      const v = row[t]!;
      if (!Number.isFinite(v)) throw new ParamError('x', `channel ${c}, sample ${t} is ${v}`);
      s += v;
    }
    const mu = s / nSamples;
    mean[c] = mu;
    const out = new Float64Array(nSamples);
    for (let t = 0; t < nSamples; t++) out[t] = row[t]! - mu;
    return out;
  });
  const cov = covariance(xc, nSamples);
  let totalVariance = 0;
  for (let c = 0; c < nChannels; c++) totalVariance += cov[c * nChannels + c]!;

  const { values, vectors } = symmetricEig(cov, nChannels);
  const m = nComponents;
  const floor = RANK_TOLERANCE * Math.max(values[0]!, 0);
  if (!(values[m - 1]! > floor)) {
    const rank = values.filter((v) => v > floor).length;
    throw new ParamError('nComponents', `the data have ${rank} directions with variance, fewer than the ${m} requested`);
  }
  const whitening = new Float64Array(m * nChannels);
  const dewhitening = new Float64Array(nChannels * m);
  for (let j = 0; j < m; j++) {
    const sd = Math.sqrt(values[j]!);
    for (let c = 0; c < nChannels; c++) {
      const e = vectors[c * nChannels + j]!;
      whitening[j * nChannels + c] = e / sd;
      dewhitening[c * m + j] = e * sd;
    }
  }
  const z = project(xc, whitening, m, nSamples);
  return { nChannels, nComponents: m, nSamples, mean, eigenvalues: values, totalVariance, whitening, dewhitening, z };
}

/** Covariance (N − 1 normalisation) of centred channels, summed in sample chunks for cache reuse. */
function covariance(xc: Float64Array[], n: number): Float64Array {
  const c = xc.length;
  const cov = new Float64Array(c * c);
  const chunk = 2048;
  for (let t0 = 0; t0 < n; t0 += chunk) {
    const t1 = Math.min(n, t0 + chunk);
    for (let i = 0; i < c; i++) {
      const a = xc[i]!;
      for (let j = i; j < c; j++) {
        const b = xc[j]!;
        let acc = 0;
        for (let t = t0; t < t1; t++) acc += a[t]! * b[t]!;
        cov[i * c + j]! += acc;
      }
    }
  }
  for (let i = 0; i < c; i++) {
    for (let j = i; j < c; j++) {
      const v = cov[i * c + j]! / (n - 1);
      cov[i * c + j] = v;
      cov[j * c + i] = v;
    }
  }
  return cov;
}

/** z = W xc as sample-major [sample][comp] (saxpy per channel, then one transpose). */
function project(xc: Float64Array[], w: Float64Array, m: number, n: number): Float64Array {
  const c = xc.length;
  const rows = Array.from({ length: m }, () => new Float64Array(n));
  for (let j = 0; j < m; j++) {
    const out = rows[j]!;
    for (let ch = 0; ch < c; ch++) {
      const coef = w[j * c + ch]!;
      if (coef === 0) continue;
      const src = xc[ch]!;
      for (let t = 0; t < n; t++) out[t]! += coef * src[t]!;
    }
  }
  const z = new Float64Array(n * m);
  for (let j = 0; j < m; j++) {
    const r = rows[j]!;
    for (let t = 0; t < n; t++) z[t * m + j] = r[t]!;
  }
  return z;
}
