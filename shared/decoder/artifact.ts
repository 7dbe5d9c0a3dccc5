/**
 * The frozen decoder's artifact: one versioned JSON object holding everything prediction needs
 * (channels, rate, filters, epoch window, the learned model of the selected components only),
 * the training summary and the cross-validated metrics, sealed by SHA-256 (FIPS 180-4) over its
 * canonical bytes. Binary arrays are base64 of little-endian float64 (`encodeF64`), so they
 * round-trip exactly.
 *
 * Canonical bytes: UTF-8 of the canonical JSON of the artifact without its `sha256` field:
 * object keys sorted by UTF-16 code units, no whitespace, numbers as JavaScript prints them
 * (shortest round-trip form), strings as JSON.stringify escapes them. `verifyArtifact`
 * recomputes the hash, so any change to any field (a weight, a class name, a metric) is detected.
 */
import { ShapeError } from '../types';
import { asRecord, decodeF64, decodeRows, numberField, type EncodedRows } from './pipeline';
import { sha256Hex, utf8Bytes } from './sha256';

export const ARTIFACT_FORMAT = 'aftercue-decoder';
export const ARTIFACT_VERSION = 1;

/** Pre-processing as stored (online.ts PreprocessSpec without the channel list). */
export interface ArtifactPreprocessing {
  bandpass: { order: number; edgesHz: [number, number]; sos: number[][] };
  notch: { f0Hz: number; q: number; sos: number[][] } | null;
  car: boolean;
  /** Filter start-up: steady state for the first sample of each channel (online.ts). */
  start: 'steady-state-first-sample';
}

/** Learned model of the component-tf recipe, selected (non-zero) components only. */
export interface ComponentTfModel {
  kind: 'component-tf';
  /** Components ICA produced in the final fit, and which of them the decoder uses (ascending). */
  fittedComponents: number;
  selected: number[];
  /** Channel means removed before unmixing, [channel]. */
  mean: string; // f64
  /** Unmixing rows of the selected components, [selected][channel]. */
  unmixing: EncodedRows;
  /** Scalp maps (mixing columns) of the selected components, stored as rows [selected][channel]. */
  maps: EncodedRows;
  cwt: { frequenciesHz: number[]; cycles: number; binS: number; nSamples: number;
         normalisation: 'unit-energy'; padding: 'reflect'; lowHz: number; highHz: number; count: number };
  /** Per-feature standardisation of the selected blocks, [selected][F][T] flattened. */
  featureMean: string; // f64
  featureScale: string; // f64
  /** Weights W_k of the selected blocks, [selected][F][T] flattened; block shape F×T. */
  weights: string; // f64
  blockShape: { rows: number; cols: number };
  bias: number;
  lambda: number;
  /** Prior weights w_k and plausibility of every fitted component (index = component). */
  priorWeights: number[];
  plausibility: number[];
  prior: boolean;
}

/** Learned model of the covariance recipe. */
export interface CovarianceModel {
  kind: 'covariance';
  /** P (r×C): whitening by the training mean covariance, on the r kept directions (recipes/covariance.ts). */
  whitening: EncodedRows;
  /** C̄ Pᵀ (C×r), for spatial patterns (interpretation only). */
  patternBasis: EncodedRows;
  /** S̄ (r×r, row-major) and the global scale. */
  centre: string; // f64
  scale: number;
  /** W (r×r, row-major). */
  weight: string; // f64
  bias: number;
  lambda: number;
  rank: number;
  /** Feature map (recipes/covariance.ts); absent in artifacts written before it existed, i.e. 'linear'. */
  map?: 'linear' | 'log';
}

/** The whole artifact (format version 1). */
export interface DecoderArtifact {
  format: typeof ARTIFACT_FORMAT;
  formatVersion: typeof ARTIFACT_VERSION;
  recipe: 'component-tf' | 'covariance';
  /** Class names in label order: P(class 1) is the probability of classes[1]. */
  classes: [string, string];
  channelNames: string[];
  sampleRateHz: number;
  epoch: { tminS: number; tmaxS: number; offsetSamples: number; lengthSamples: number };
  preprocessing: ArtifactPreprocessing;
  model: ComponentTfModel | CovarianceModel;
  /** Training summary and cross-validated metrics (the REPORT.json figures). */
  training: Record<string, unknown>;
  metrics: Record<string, unknown>;
  /** Lower-case hex SHA-256 of the canonical bytes (module comment). */
  sha256: string;
}

/** Thrown when an artifact's seal does not match its content. */
export class ArtifactIntegrityError extends Error {
  constructor(readonly expected: string, readonly actual: string) {
    super(`artifact hash mismatch: stored ${expected}, content hashes to ${actual}`);
    this.name = 'ArtifactIntegrityError';
  }
}

/**
 * Canonical JSON: sorted keys, no whitespace (module comment). Throws ShapeError for values
 * JSON cannot represent exactly (non-finite numbers, undefined, functions, typed arrays).
 */
export function canonicalJson(value: unknown, path = 'value'): string {
  if (value === null || typeof value === 'boolean' || typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new ShapeError(path, `expected a finite number, got ${value}`);
    return JSON.stringify(value);
  }
  if (Array.isArray(value)) return `[${value.map((v, i) => canonicalJson(v, `${path}[${i}]`)).join(',')}]`;
  if (typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    const rec = value as Record<string, unknown>;
    const keys = Object.keys(rec).filter((k) => rec[k] !== undefined).sort();
    return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(rec[k], `${path}.${k}`)}`).join(',')}}`;
  }
  throw new ShapeError(path, `expected JSON data, got ${ArrayBuffer.isView(value) ? 'a typed array' : typeof value}`);
}

/** SHA-256 (hex) of the artifact's canonical bytes, the `sha256` field left out. */
export function artifactHash(artifact: Omit<DecoderArtifact, 'sha256'> | DecoderArtifact | Record<string, unknown>): string {
  const { sha256: _ignored, ...rest } = artifact as Record<string, unknown>;
  void _ignored;
  return sha256Hex(utf8Bytes(canonicalJson(rest)));
}

/** Seals an artifact: returns a copy with `sha256` set to its hash. */
export function sealArtifact(unsealed: Omit<DecoderArtifact, 'sha256'>): DecoderArtifact {
  return { ...unsealed, sha256: artifactHash(unsealed) };
}

/** True when the stored hash equals the content's hash. */
export function verifyArtifact(artifact: unknown): boolean {
  const rec = asRecord(artifact, 'artifact');
  return typeof rec.sha256 === 'string' && rec.sha256 === artifactHash(rec);
}

/** The artifact as canonical JSON text including its seal (what a file or BLOB stores). */
export function serialiseArtifact(artifact: DecoderArtifact): string {
  return canonicalJson(artifact);
}

/**
 * Parses and checks an artifact: the seal (ArtifactIntegrityError when it does not match), the
 * format and version, and the shapes predict relies on (ShapeError naming the field).
 * @param value parsed JSON (e.g. JSON.parse of a file)
 */
export function parseArtifact(value: unknown): DecoderArtifact {
  const rec = asRecord(value, 'artifact');
  const actual = artifactHash(rec);
  if (rec.sha256 !== actual) throw new ArtifactIntegrityError(String(rec.sha256), actual);
  if (rec.format !== ARTIFACT_FORMAT) throw new ShapeError('artifact.format', `expected '${ARTIFACT_FORMAT}', got ${String(rec.format)}`);
  if (rec.formatVersion !== ARTIFACT_VERSION) throw new ShapeError('artifact.formatVersion', `expected ${ARTIFACT_VERSION}, got ${String(rec.formatVersion)}`);
  const a = rec as unknown as DecoderArtifact;
  if (!Array.isArray(a.classes) || a.classes.length !== 2 || !a.classes.every((c) => typeof c === 'string')) {
    throw new ShapeError('artifact.classes', 'expected two class names');
  }
  if (!Array.isArray(a.channelNames) || !a.channelNames.every((c) => typeof c === 'string')) {
    throw new ShapeError('artifact.channelNames', 'expected an array of channel names');
  }
  numberField(rec, 'sampleRateHz', 'artifact');
  const epoch = asRecord(a.epoch, 'artifact.epoch');
  for (const k of ['tminS', 'tmaxS', 'offsetSamples', 'lengthSamples']) numberField(epoch, k, 'artifact.epoch');
  asRecord(a.preprocessing, 'artifact.preprocessing');
  const model = asRecord(a.model, 'artifact.model');
  const c = a.channelNames.length;
  if (model.kind === 'component-tf') {
    const m = a.model as ComponentTfModel;
    const unmix = decodeRows(m.unmixing, 'artifact.model.unmixing');
    const size = m.selected.length * m.blockShape.rows * m.blockShape.cols;
    if (unmix.length !== m.selected.length || (unmix.length > 0 && unmix[0]!.length !== c)) {
      throw new ShapeError('artifact.model.unmixing', `expected ${m.selected.length}×${c}`);
    }
    for (const k of ['weights', 'featureMean', 'featureScale'] as const) {
      const n = decodeF64(m[k], `artifact.model.${k}`).length;
      if (n !== size) throw new ShapeError(`artifact.model.${k}`, `expected ${size} values, got ${n}`);
    }
  } else if (model.kind === 'covariance') {
    const m = a.model as CovarianceModel;
    const p = decodeRows(m.whitening, 'artifact.model.whitening');
    if (p.length !== m.rank || p[0]!.length !== c) throw new ShapeError('artifact.model.whitening', `expected ${m.rank}×${c}`);
    for (const k of ['weight', 'centre'] as const) {
      const n = decodeF64(m[k], `artifact.model.${k}`).length;
      if (n !== m.rank * m.rank) throw new ShapeError(`artifact.model.${k}`, `expected ${m.rank * m.rank} values, got ${n}`);
    }
    if (m.map !== undefined && m.map !== 'linear' && m.map !== 'log') throw new ShapeError('artifact.model.map', `expected 'linear' or 'log', got ${String(m.map)}`);
  } else {
    throw new ShapeError('artifact.model.kind', `expected 'component-tf' or 'covariance', got ${String(model.kind)}`);
  }
  return a;
}
