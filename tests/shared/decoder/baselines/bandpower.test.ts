import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../../../helpers/all-close';
import { bandPowerStage, logBandPower } from '../../../../shared/decoder/baselines/bandpower';
import { fitPipeline, pipelineFromArtifact } from '../../../../shared/decoder/pipeline';
import { welchPsd } from '../../../../shared/tf/welch';
import type { Epochs } from '../../../../shared/types';
import fixture from '../../../fixtures/baselines/bandpower.json';

const toEpochs = (e: number[][][]): Epochs => e.map((t) => t.map((ch) => Float64Array.from(ch)));

describe('log band power', () => {
  it.each(fixture.cases)('matches scipy.signal.welch band sums on $name', (c) => {
    const params = { sampleRateHz: c.sampleRateHz, segmentLength: c.segmentLength,
                     bandsHz: c.bandsHz as [number, number][], ...('overlap' in c ? { overlap: c.overlap } : {}) };
    const x = toEpochs(c.epochs);
    const seg = Math.min(c.segmentLength, x[0]![0]!.length);
    // Source: tests/fixtures/baselines/bandpower.json (scipy.signal.welch PSD of trial 0, channel 0).
    expectAllClose(welchPsd(x[0]![0]!, c.sampleRateHz, { segmentLength: seg, ...('overlap' in c ? { overlap: c.overlap } : {}) }).psd,
                   c.expected.psdTrial0Channel0, { rtol: 1e-9, atol: 1e-12 });
    // Source: same fixture (log of Σ psd·Δf over low <= f < high).
    expectAllClose(logBandPower(x, params).flatMap((r) => Array.from(r)), c.expected.features.flat(), { rtol: 1e-10, atol: 1e-12 });
  });

  it('puts a 10 Hz sinusoid in the 8-13 Hz band with the power A²/2', () => {
    const fs = 160, n = 320;
    const x: Epochs = [[Float64Array.from({ length: n }, (_, i) => 4 * Math.sin((2 * Math.PI * 10 * i) / fs))]];
    const [f] = logBandPower(x, { sampleRateHz: fs });
    // Source: Parseval (a sine of amplitude A has mean power A²/2 = 8 µV²); Hann leakage stays within 8-13 Hz.
    expectAllClose([Math.exp(f![0]!)], [8], { rtol: 1e-3 });
    expect(f![1]!).toBeLessThan(f![0]! - 10);
  });

  it('is stateless and survives a JSON round trip; a flat channel stays finite', () => {
    const x: Epochs = [[new Float64Array(200), Float64Array.from({ length: 200 }, (_, i) => Math.sin(i))]];
    const p = fitPipeline([bandPowerStage({ sampleRateHz: 100, bandsHz: [[5, 20]] })], x, Uint8Array.of(0));
    const back = pipelineFromArtifact<Epochs>(JSON.parse(JSON.stringify(p.toArtifact())));
    // Source: pipeline contract (stateless stage: params alone rebuild it).
    expect(back.transform(x)).toEqual(p.transform(x));
    // Source: module convention (power floored at 1e-300).
    expect((p.transform(x) as Float64Array[])[0]![0]).toBeCloseTo(Math.log(1e-300), 6);
  });

  it('rejects a band above Nyquist', () => {
    // Source: sampling theorem (no power above fs/2).
    expect(() => bandPowerStage({ sampleRateHz: 100, bandsHz: [[40, 60]] })).toThrow(/bandsHz/);
  });
});
