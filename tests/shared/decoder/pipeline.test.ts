import { describe, expect, it } from 'vitest';
import { createRng } from '../../../shared/linalg/random';
import {
  decodeF64, decodeRows, encodeF64, encodeRows, fitPipeline, pipelineFromArtifact, registerStageKind,
  take, takeLabels, type FeatureRows, type Fitted, type Stage,
} from '../../../shared/decoder/pipeline';
import { standardizeStage } from '../../../shared/decoder/stages/standardize';
import { selectKBestStage } from '../../../shared/decoder/stages/select-k-best';
import { logisticStage } from '../../../shared/decoder/baselines/logistic';

function noisyRows(n: number, p: number, seed: number, shift = 1): { x: FeatureRows; y: Uint8Array } {
  const rng = createRng(seed);
  const y = Uint8Array.from({ length: n }, (_, i) => i % 2);
  const x = Array.from({ length: n }, (_, i) => Float64Array.from({ length: p }, (_, j) =>
    rng.nextNormal() * 2 + (j < 3 ? shift * y[i]! : 0) + 5));
  return { x, y };
}

/** A stage that records what its fit received and adds 1 to every feature. */
function recordingStage(seen: FeatureRows[]): Stage<FeatureRows, FeatureRows> {
  const fitted: Fitted<FeatureRows, FeatureRows> = {
    kind: 'test-plus-one',
    transform: (x) => x.map((r) => r.map((v) => v + 1)),
    toArtifact: () => ({ kind: 'test-plus-one', version: 1, params: {}, learned: {} }),
  };
  return { kind: 'test-plus-one', params: {}, fit(x) { seen.push(x); return fitted; } };
}

describe('fitPipeline', () => {
  it('fits each stage on the previous fitted stage transform of the training data', () => {
    const { x, y } = noisyRows(12, 4, 1);
    const seen: FeatureRows[] = [];
    fitPipeline([recordingStage(seen), recordingStage(seen), logisticStage()], x, y);
    // Source: STYLE.md §3 (stages fitted in order, each on the previous transform).
    expect(seen[0]).toBe(x);
    expect(Array.from(seen[1]![3]!)).toEqual(Array.from(x[3]!, (v) => v + 1));
  });

  it('does not modify the recipe or its input, and refitting gives identical results', () => {
    const { x, y } = noisyRows(20, 6, 2);
    const recipe = [standardizeStage(), selectKBestStage({ k: 3 }), logisticStage({ C: 0.5 })];
    const before = JSON.stringify(recipe.map((s) => s.params));
    const copy = x.map((r) => Float64Array.from(r));
    const a = fitPipeline(recipe, x, y).predictProba(x);
    const b = fitPipeline(recipe, x, y).predictProba(x);
    // Source: STYLE.md §3 (the recipe is never mutated) and §4 ("does not modify its input").
    expect(JSON.stringify(recipe.map((s) => s.params))).toBe(before);
    expect(x).toEqual(copy);
    expect(Array.from(a)).toEqual(Array.from(b));
  });

  it('rebuilds a saved pipeline from JSON that predicts bit for bit the same', () => {
    const { x, y } = noisyRows(30, 8, 3);
    const fitted = fitPipeline([standardizeStage(), selectKBestStage({ k: 4 }), logisticStage()], x, y);
    const json = JSON.parse(JSON.stringify(fitted.toArtifact())) as unknown;
    const rebuilt = pipelineFromArtifact<FeatureRows>(json);
    // Source: STYLE.md §3 (toArtifact holds everything learned; fromArtifact reverses it).
    expect(Array.from(rebuilt.predictProba(x))).toEqual(Array.from(fitted.predictProba(x)));
    expect(Array.from(rebuilt.predict(x))).toEqual(Array.from(fitted.predict(x)));
  });

  it('refuses an artifact of an unregistered kind, naming the field', () => {
    // Source: STYLE.md §3 (typed errors naming the field).
    expect(() => pipelineFromArtifact({ kind: 'pipeline', version: 1,
      stages: [{ kind: 'no-such-stage', version: 1, params: {}, learned: {} }] })).toThrow(/artifact\.kind/);
    expect(() => pipelineFromArtifact({ kind: 'pipeline', version: 2, stages: [] })).toThrow(/version/);
  });

  it('refuses to register one kind twice with different decoders', () => {
    const from = () => { throw new Error('unused'); };
    registerStageKind('test-dup', from);
    // Source: pipeline.ts contract (two modules claiming one kind is a bug).
    expect(() => registerStageKind('test-dup', () => { throw new Error('other'); })).toThrow(/already registered/);
  });

  it('asks for a classifier last when probabilities are requested', () => {
    const { x, y } = noisyRows(10, 3, 4);
    const p = fitPipeline([standardizeStage()], x, y);
    // Source: pipeline.ts contract (predictProba needs a Classifier as the last stage).
    expect(() => p.predictProba(x)).toThrow(/classifier/);
  });
});

describe('artifact codecs and indexing helpers', () => {
  it('encodeF64/decodeF64 round-trip every double exactly, NaN and infinities included', () => {
    const v = Float64Array.of(0, -0, 1.5, -1e-310, Math.PI, NaN, Infinity, -Infinity, 1.7976931348623157e308);
    for (let len = 0; len <= v.length; len++) {
      const back = decodeF64(encodeF64(v.subarray(0, len)));
      // Source: IEEE 754 bytes are stored verbatim (RFC 4648 base64), so equality is exact.
      expect(Array.from(back)).toEqual(Array.from(v.subarray(0, len)));
    }
    // Source: RFC 4648 §10 test vector idea: 8 zero bytes are "AAAAAAAAAAA=".
    expect(encodeF64([0])).toBe('AAAAAAAAAAA=');
    expect(Array.from(decodeF64([1, 2]))).toEqual([1, 2]);
    expect(() => decodeF64('AAA')).toThrow(/float64/);
  });

  it('encodeRows/decodeRows keep the matrix shape', () => {
    const rows = [Float64Array.of(1, 2, 3), Float64Array.of(4, 5, 6)];
    // Source: round trip of the codec defined in pipeline.ts.
    expect(decodeRows(JSON.parse(JSON.stringify(encodeRows(rows))), 'm')).toEqual(rows);
  });

  it('take and takeLabels pick trials in the given order and reject bad indices', () => {
    // Source: definition.
    expect(take(['a', 'b', 'c'], Int32Array.of(2, 0))).toEqual(['c', 'a']);
    expect(Array.from(takeLabels(Uint8Array.of(0, 1, 1), [1, 0]))).toEqual([1, 0]);
    expect(() => take(['a'], [1])).toThrow(/indices/);
  });
});
