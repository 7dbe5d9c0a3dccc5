import { describe, expect, it } from 'vitest';
import {
  ArtifactIntegrityError, artifactHash, canonicalJson, parseArtifact, serialiseArtifact, verifyArtifact, type DecoderArtifact,
} from '../../../shared/decoder/artifact';
import { loadDecoder, predictFilteredEpoch } from '../../../shared/decoder/predict';
import { createRng } from '../../../shared/linalg/random';
import { ShapeError } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';
import { fittedDecoder } from '../../fixtures/decoder/fitted';

describe('canonicalJson', () => {
  it('sorts keys at every level and writes no whitespace', () => {
    // Source: artifact.ts module comment (our canonical form; RFC 8785-like key order by code unit).
    expect(canonicalJson({ b: 1, a: { d: [1, 'x', null], c: true } })).toBe('{"a":{"c":true,"d":[1,"x",null]},"b":1}');
  });

  it('refuses values JSON cannot carry exactly', () => {
    // Source: common practice (NaN/Infinity are not JSON; typed arrays must be encoded first).
    expect(() => canonicalJson({ a: NaN })).toThrow(ShapeError);
    expect(() => canonicalJson({ a: new Float64Array(2) })).toThrow(ShapeError);
  });
});

describe.each(['covariance', 'component-tf'] as const)('the %s artifact', (recipe) => {
  const { fp, artifact, test } = fittedDecoder(recipe);

  it('round-trips through JSON text and predicts exactly as the fitted pipeline', () => {
    const decoder = loadDecoder(JSON.parse(serialiseArtifact(artifact)) as unknown);
    const ours = Float64Array.from(test, (data, i) => predictFilteredEpoch(decoder, { kind: 'filtered-epoch', data, cueSample: i, filledSamples: 0 }).probability);
    // Source: invariant (predict.ts recomputes the pipeline's arithmetic from the artifact); tolerance 1e-12 per the brief.
    expectAllClose(ours, fp.predictProba(test), { rtol: 0, atol: 1e-12 });
    // Common practice: the check is only meaningful for a decoder that is not constant.
    expect(new Set(ours).size).toBeGreaterThan(1);
  });

  it('predicts exactly as the fitted pipeline with the other covariance map', () => {
    if (recipe !== 'covariance') return;
    const other = fittedDecoder('covariance', { covarianceMap: artifact.model.kind === 'covariance' && artifact.model.map === 'log' ? 'linear' : 'log' });
    const decoder = loadDecoder(JSON.parse(serialiseArtifact(other.artifact)) as unknown);
    const ours = Float64Array.from(other.test, (data, i) => predictFilteredEpoch(decoder, { kind: 'filtered-epoch', data, cueSample: i, filledSamples: 0 }).probability);
    // Source: invariant, as above (the 'log' map has no low-rank shortcut; the 'linear' one does).
    expectAllClose(ours, other.fp.predictProba(other.test), { rtol: 0, atol: 1e-12 });
    expect(new Set(ours).size).toBeGreaterThan(1);
    expect(other.artifact.model.kind === 'covariance' && (other.artifact.model.map ?? 'linear')).not.toBe(artifact.model.kind === 'covariance' && (artifact.model.map ?? 'linear'));
  });

  it('keeps only the selected components\' unmixing rows', () => {
    if (artifact.model.kind !== 'component-tf') return;
    const rows = (artifact.model.unmixing as { rows: number }).rows;
    // Source: issue 4 part 6 (unmixing rows of the selected components only).
    expect(rows).toBe(artifact.model.selected.length);
    expect(rows).toBeLessThanOrEqual(artifact.model.fittedComponents);
  });

  it('is sealed: the stored hash is the hash of the canonical bytes without it', () => {
    // Source: artifact.ts module comment; verified against our FIPS-checked SHA-256.
    expect(artifact.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(artifactHash(artifact)).toBe(artifact.sha256);
    expect(verifyArtifact(artifact)).toBe(true);
  });

  it('detects a change of any byte of its text', () => {
    const text = serialiseArtifact(artifact);
    const rng = createRng(11);
    for (let trial = 0; trial < 200; trial++) {
      const pos = rng.nextInt(text.length);
      const old = text.charCodeAt(pos);
      let repl = 32 + rng.nextInt(95);
      if (repl === old) repl = old === 65 ? 66 : 65;
      const changed = text.slice(0, pos) + String.fromCharCode(repl) + text.slice(pos + 1);
      let value: unknown;
      try { value = JSON.parse(changed); } catch { continue; } // not JSON any more: cannot be loaded at all
      // Source: artifact.ts (a changed byte changes the canonical bytes or the stored hash).
      expect(verifyArtifact(value), `byte ${pos}: ${String.fromCharCode(old)} -> ${String.fromCharCode(repl)}`).toBe(false);
    }
  });

  it('refuses to load when a weight changed by one unit in the last place', () => {
    const copy = JSON.parse(serialiseArtifact(artifact)) as DecoderArtifact;
    const bias = copy.model.bias;
    copy.model.bias = bias + Math.abs(bias) * Number.EPSILON + Number.MIN_VALUE;
    // Source: artifact.ts (the seal covers every field).
    expect(() => loadDecoder(copy)).toThrow(ArtifactIntegrityError);
    expect(() => parseArtifact({ ...artifact, classes: ['right', 'left'] })).toThrow(ArtifactIntegrityError);
  });
});
