/**
 * Recipe b, covariance: the second-order form of Tomioka & Müller 2010 (NeuroImage
 * 49(1):415-432, §2: a trial's band-passed spatial covariance as one symmetric matrix feature of
 * trace-norm logistic regression; the low-rank weight's eigenvectors are spatial filters).
 *
 * Stage 'whitened-covariance' (fit on training trials only):
 *   C_i = (X_i − m_i)(X_i − m_i)ᵀ / T       per trial, X_i [channel][sample], m_i channel means
 *   C̄ = mean_i C_i = V Λ Vᵀ;  P = Λ_r^(−1/2) V_rᵀ  (r×C; eigenvalues ≤ 1e-10·λ_max dropped, so
 *       rank-deficient data such as CAR-referenced EEG work; r = C otherwise)
 *   S_i = P C_i Pᵀ (r×r);  map 'log': S_i ← log S_i (matrix logarithm, linalg/spd-log.ts)
 *   centre S̄ = mean_i S_i (≈ I, or ≈ 0 for 'log');  scale s = RMS entry of S_i − S̄
 *   feature F_i = (S_i − S̄)/s, one r×r block.
 * Map 'linear' (the covariance itself) is the form of Tomioka & Müller 2010: the decision is
 * linear in the band power of rank(W) spatially filtered signals. Map 'log' is the tangent-space
 * (log-Euclidean) map at the training mean (Arsigny et al. 2007, SIAM J Matrix Anal Appl
 * 29(1):328-347; Barachant et al. 2012, IEEE TBME 59(4):920-928, there at the Riemannian mean,
 * here at the arithmetic one): log(C̄^(−1/2) C_i C̄^(−1/2)), up to the rotation Vᵀ, which the
 * rotation-invariant trace norm does not see. Where W's eigenvectors u_j are eigenvectors of S_i,
 * uᵀ log(S_i) u = log(uᵀ S_i u): the decision becomes linear in the LOG band power of the filtered
 * signals, as CSP's features are (Ramoser et al. 2000), so a trial with outlying power moves it
 * by its log rather than linearly. Near the mean (S_i ≈ I, log S_i ≈ S_i − I) the two maps agree,
 * and the filter and pattern reading below holds for both to first order.
 * Whitening by the training mean makes the features invariant to any invertible mixing of the
 * channels (S_i → Q S_i Qᵀ with Q orthogonal, and the trace norm is rotation-invariant).
 * Interpretation (Haufe et al. 2014, NeuroImage 87:96-110): for W = Σ_j μ_j u_j u_jᵀ (symmetric
 * eigendecomposition), filter_j = Pᵀ u_j (C), pattern_j = C̄ filter_j = V_r Λ_r^(1/2) u_j.
 */
import { createSpdLogWorkspace, spdLogInto, type SpdLogWorkspace } from '../../linalg/spd-log';
import { symmetricEig } from '../../linalg/symmetric-eig';
import { COVARIANCE_MAPS, DEFAULT_COVARIANCE_MAP, type CovarianceMap } from './covariance-map';
import { ParamError, ShapeError, type Epochs } from '../../types';
import { checkEpochs } from '../epochs';
import {
  decodeF64, decodeRows, encodeF64, encodeRows, expectArtifact, numberField, registerStageKind,
  type AnyStage, type Fitted, type Stage, type StageArtifact,
} from '../pipeline';
import type { MatrixTrials } from './matrix-trials';
import { traceNormCvStage, type SolverClock, type TraceNormCvParams } from './tracenorm-cv';

/** What the whitened-covariance stage learned. */
export interface FittedWhitenedCovariance extends Fitted<Epochs, MatrixTrials> {
  readonly whitening: Float64Array[]; // [r][channel], P
  readonly dewhitening: Float64Array[]; // [channel][r], V_r Λ_r^(1/2) (patterns = this · u)
  readonly centre: Float64Array; // [r·r], S̄ row-major
  readonly scale: number;
  readonly map: CovarianceMap;
}

export { COVARIANCE_MAPS, type CovarianceMap } from './covariance-map';

/**
 * Mean-removed spatial covariance X Xᵀ / T of one trial, C×C row-major. Four channel pairs per
 * pass over the samples (the centred row of channel a is read once for b..b+3), which is about
 * three times faster than one pair per pass; predict and fit share this function.
 * @param out optional C×C destination; @param scratch optional C·T buffer for the centred samples
 */
export function trialCovariance(x: Float64Array[], out?: Float64Array, scratch?: Float64Array): Float64Array {
  const c = x.length;
  const n = x[0]?.length ?? 0;
  if (n < 2) throw new ShapeError('x', `expected at least 2 samples per channel, got ${n}`);
  const cov = out ?? new Float64Array(c * c);
  const buf = scratch !== undefined && scratch.length >= c * n ? scratch : new Float64Array(c * n);
  for (let a = 0; a < c; a++) {
    const row = x[a]!;
    if (row.length !== n) throw new ShapeError(`x[${a}]`, `expected ${n} samples, got ${row.length}`);
    let m = 0;
    for (let k = 0; k < n; k++) m += row[k]!;
    m /= n;
    const o = a * n;
    for (let k = 0; k < n; k++) buf[o + k] = row[k]! - m;
  }
  for (let a = 0; a < c; a++) {
    const oa = a * n;
    let b = a;
    for (; b + 3 < c; b += 4) {
      const o0 = b * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
      let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
      for (let k = 0; k < n; k++) {
        const v = buf[oa + k]!;
        s0 += v * buf[o0 + k]!; s1 += v * buf[o1 + k]!; s2 += v * buf[o2 + k]!; s3 += v * buf[o3 + k]!;
      }
      cov[a * c + b] = cov[b * c + a] = s0 / n;
      cov[a * c + b + 1] = cov[(b + 1) * c + a] = s1 / n;
      cov[a * c + b + 2] = cov[(b + 2) * c + a] = s2 / n;
      cov[a * c + b + 3] = cov[(b + 3) * c + a] = s3 / n;
    }
    for (; b < c; b++) {
      const ob = b * n;
      let s = 0;
      for (let k = 0; k < n; k++) s += buf[oa + k]! * buf[ob + k]!;
      cov[a * c + b] = cov[b * c + a] = s / n;
    }
  }
  return cov;
}

/** S = P C Pᵀ for P r×C (rows) and C C×C row-major; returns r×r row-major. */
function congruence(p: readonly Float64Array[], cov: Float64Array, c: number, out: Float64Array): Float64Array {
  const r = p.length;
  const pc = new Float64Array(r * c);
  for (let i = 0; i < r; i++) {
    const pi = p[i]!;
    for (let b = 0; b < c; b++) {
      let s = 0;
      for (let a = 0; a < c; a++) s += pi[a]! * cov[a * c + b]!;
      pc[i * c + b] = s;
    }
  }
  for (let i = 0; i < r; i++) {
    for (let j = i; j < r; j++) {
      const pj = p[j]!;
      let s = 0;
      for (let b = 0; b < c; b++) s += pc[i * c + b]! * pj[b]!;
      out[i * r + j] = s;
      out[j * r + i] = s;
    }
  }
  return out;
}

/**
 * The feature of one trial, F = (map(P C Pᵀ) − S̄)/s (module comment), written to out[offset ..
 * offset + r²); `cov` (C²) and `s` (r²) are scratch buffers, `logWs` the logarithm's buffers for
 * map 'log' (null: map 'linear'). The fitted stage and the frozen decoder (predict.ts) both call
 * this, so they compute the same numbers.
 */
export function covarianceFeature(whitening: readonly Float64Array[], centre: Float64Array, scale: number, trial: Float64Array[],
                                  out: Float64Array, offset: number, cov: Float64Array, s: Float64Array, scratch?: Float64Array,
                                  logWs: SpdLogWorkspace | null = null): void {
  const r = whitening.length;
  const c = trial.length;
  congruence(whitening, trialCovariance(trial, cov, scratch), c, s);
  if (logWs !== null) spdLogInto(s, 0, s, 0, logWs);
  for (let j = 0; j < r * r; j++) out[offset + j] = (s[j]! - centre[j]!) / scale;
}

function makeFitted(whitening: Float64Array[], dewhitening: Float64Array[], centre: Float64Array, scale: number,
                    map: CovarianceMap): FittedWhitenedCovariance {
  const r = whitening.length;
  const c = whitening[0]?.length ?? 0;
  const transform = (x: Epochs): MatrixTrials => {
    checkEpochs(x, 'epochs', c);
    const out = new Float64Array(x.length * r * r);
    const cov = new Float64Array(c * c);
    const s = new Float64Array(r * r);
    const logWs = map === 'log' ? createSpdLogWorkspace(r) : null;
    x.forEach((trial, i) => covarianceFeature(whitening, centre, scale, trial, out, i * r * r, cov, s, undefined, logWs));
    return { features: { nTrials: x.length, blocks: [{ rows: r, cols: r, symmetric: true }], x: out }, blockWeights: Float64Array.of(1) };
  };
  return {
    kind: 'whitened-covariance', whitening, dewhitening, centre, scale, map, transform,
    toArtifact: () => ({ kind: 'whitened-covariance', version: 1, params: { map },
                         learned: { whitening: encodeRows(whitening), dewhitening: encodeRows(dewhitening), centre: encodeF64(centre), scale } }),
  };
}

/** Hyperparameters of the whitened-covariance stage. */
export type WhitenedCovarianceParams = {
  /** Number of whitened directions kept (null: all above 1e-10·λ_max of C̄). */
  rank?: number | null;
  /**
   * Which directions are kept when `rank` is set: 'variance', the leading principal directions
   * of C̄ (PCA before whitening); or 'fluctuation', after whitening all directions, the leading
   * eigenvectors U of M = mean_i (S_i − S̄)², i.e. the directions in which the trials'
   * covariances vary most (label-free). Default 'fluctuation' (see module comment).
   */
  subspace?: 'variance' | 'fluctuation';
  /** Feature map (module comment), default 'linear'. A reduced rank's directions are chosen on the linear covariances either way. */
  map?: CovarianceMap;
};

/** Stage: whitened, centred, scaled trial covariances (module comment). */
export function whitenedCovarianceStage(params: WhitenedCovarianceParams = {}): Stage<Epochs, MatrixTrials> {
  const rank = params.rank ?? null;
  const subspace = params.subspace ?? 'fluctuation';
  const map = params.map ?? 'linear';
  if (!COVARIANCE_MAPS.includes(map)) throw new ParamError('map', `expected one of ${COVARIANCE_MAPS.join(', ')}, got ${String(map)}`);
  if (rank !== null && !(Number.isInteger(rank) && rank >= 1)) throw new ParamError('rank', `expected an integer >= 1 or null, got ${rank}`);
  if (subspace !== 'variance' && subspace !== 'fluctuation') throw new ParamError('subspace', `expected 'variance' or 'fluctuation', got ${String(subspace)}`);
  return {
    kind: 'whitened-covariance', params: { rank, subspace, map },
    fit(x) {
      const { trials, channels: c } = checkEpochs(x);
      if (trials < 2) throw new ShapeError('epochs', `expected at least 2 training trials, got ${trials}`);
      const covs = x.map((trial) => trialCovariance(trial));
      const mean = new Float64Array(c * c);
      for (const cv of covs) for (let j = 0; j < c * c; j++) mean[j]! += cv[j]! / trials;
      const { values, vectors } = symmetricEig(mean, c);
      const keep: number[] = [];
      const pcaRank = subspace === 'variance' ? rank : null;
      for (let j = 0; j < c && (pcaRank === null || j < pcaRank); j++) if (values[j]! > 1e-10 * values[0]!) keep.push(j);
      if (keep.length === 0) throw new ShapeError('epochs', 'expected signals with non-zero power, got all zeros');
      let whitening = keep.map((j) => Float64Array.from({ length: c }, (_, a) => vectors[a * c + j]! / Math.sqrt(values[j]!)));
      // C̄ Pᵀ = V_r Λ_r^(1/2): the pattern basis (Haufe et al. 2014), [channel][direction].
      let dewhitening = Array.from({ length: c }, (_, a) => Float64Array.from(keep, (j) => vectors[a * c + j]! * Math.sqrt(values[j]!)));
      let r = keep.length;
      let s = covs.map((cv) => congruence(whitening, cv, c, new Float64Array(r * r)));
      let centre = meanOf(s, r * r);
      if (subspace === 'fluctuation' && rank !== null && rank < r) {
        const u = fluctuationBasis(s, centre, r, rank); // [r][rank]
        whitening = Array.from({ length: rank }, (_, k) => {
          const row = new Float64Array(c);
          for (let i = 0; i < r; i++) { const w = u[i]![k]!; const pi = whitening[i]!; for (let a = 0; a < c; a++) row[a]! += w * pi[a]!; }
          return row;
        });
        dewhitening = dewhitening.map((d) => Float64Array.from({ length: rank }, (_, k) => { let acc = 0; for (let i = 0; i < r; i++) acc += d[i]! * u[i]![k]!; return acc; }));
        r = rank;
        s = covs.map((cv) => congruence(whitening, cv, c, new Float64Array(r * r)));
        centre = meanOf(s, r * r);
      }
      if (map === 'log') {
        const ws = createSpdLogWorkspace(r);
        for (const si of s) spdLogInto(si, 0, si, 0, ws);
        centre = meanOf(s, r * r);
      }
      let ss = 0;
      for (const si of s) for (let j = 0; j < r * r; j++) ss += (si[j]! - centre[j]!) ** 2;
      const scale = Math.sqrt(ss / (trials * r * r));
      if (!(scale > 0)) throw new ShapeError('epochs', 'expected trials whose covariances differ, got identical covariances');
      return makeFitted(whitening, dewhitening, centre, scale, map);
    },
  };
}

function meanOf(s: readonly Float64Array[], size: number): Float64Array {
  const m = new Float64Array(size);
  for (const si of s) for (let j = 0; j < size; j++) m[j]! += si[j]! / s.length;
  return m;
}

/** Leading `k` eigenvectors of M = mean_i (S_i − S̄)² (r×r), as rows [i][k]. */
function fluctuationBasis(s: readonly Float64Array[], centre: Float64Array, r: number, k: number): Float64Array[] {
  const m = new Float64Array(r * r);
  const d = new Float64Array(r * r);
  for (const si of s) {
    for (let j = 0; j < r * r; j++) d[j] = si[j]! - centre[j]!;
    for (let a = 0; a < r; a++) {
      for (let b = a; b < r; b++) {
        let acc = 0;
        for (let t = 0; t < r; t++) acc += d[a * r + t]! * d[t * r + b]!;
        m[a * r + b]! += acc / s.length;
      }
    }
  }
  for (let a = 0; a < r; a++) for (let b = 0; b < a; b++) m[a * r + b] = m[b * r + a]!;
  const { vectors } = symmetricEig(m, r);
  return Array.from({ length: r }, (_, i) => Float64Array.from({ length: k }, (_, j) => vectors[i * r + j]!));
}

/** Rebuilds the fitted stage from its artifact. */
export function whitenedCovarianceFromArtifact(a: StageArtifact): FittedWhitenedCovariance {
  expectArtifact(a, 'whitened-covariance', 1);
  const whitening = decodeRows(a.learned.whitening, 'learned.whitening');
  const centre = decodeF64(a.learned.centre, 'learned.centre');
  if (centre.length !== whitening.length ** 2) throw new ShapeError('learned.centre', `expected ${whitening.length ** 2} values, got ${centre.length}`);
  const scale = numberField(a.learned, 'scale', 'learned');
  if (!(scale > 0)) throw new ParamError('learned.scale', `expected > 0, got ${scale}`);
  const map = a.params.map ?? 'linear';
  if (!COVARIANCE_MAPS.includes(map as CovarianceMap)) throw new ParamError('params.map', `expected one of ${COVARIANCE_MAPS.join(', ')}, got ${String(map)}`);
  return makeFitted(whitening, decodeRows(a.learned.dewhitening, 'learned.dewhitening'), centre, scale, map as CovarianceMap);
}

registerStageKind('whitened-covariance', whitenedCovarianceFromArtifact);

/** Defaults of the covariance recipe (Tomioka & Müller 2010 second-order form; band and window as the CSP literature, Ramoser et al. 2000). */
export const COVARIANCE_DEFAULTS = {
  bandpassHz: [8, 30] as [number, number],
  order: 4,
  window: { tminS: 0.5, tmaxS: 2.5 },
  map: DEFAULT_COVARIANCE_MAP,
  // CAR is a rank-reducing channel map; whitening already makes the features invariant to
  // invertible channel maps, so CAR would only remove one dimension.
  car: false,
};

/** The covariance recipe's stages (input: filtered epochs of the recipe's window). */
export function covarianceStages(lambda: TraceNormCvParams = {}, clock?: SolverClock): AnyStage[] {
  return [whitenedCovarianceStage() as AnyStage, traceNormCvStage(lambda, clock) as AnyStage];
}
