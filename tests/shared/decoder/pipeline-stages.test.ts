import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../../helpers/all-close';
import { fitPipeline, pipelineFromArtifact, type FeatureRows } from '../../../shared/decoder/pipeline';
import { standardizeStage } from '../../../shared/decoder/stages/standardize';
import { anovaF, selectKBestStage } from '../../../shared/decoder/stages/select-k-best';
import { bandpassSos, bandpassStage, filterRecording } from '../../../shared/decoder/stages/bandpass';
import { checkEpochs, epochRecording } from '../../../shared/decoder/epochs';
import type { Epochs, Recording } from '../../../shared/types';
import fixture from '../../fixtures/baselines/stages.json';

const rows = (m: number[][]): FeatureRows => m.map((r) => Float64Array.from(r));
const F = fixture.features, B = fixture.bandpass;

describe('standardize and ANOVA-F selection against scikit-learn', () => {
  it('standardize learns StandardScaler mean and scale and applies them to new rows', () => {
    const fitted = standardizeStage().fit(rows(F.X));
    // Source: tests/fixtures/baselines/stages.json (StandardScaler mean_, scale_; constant feature scale 1).
    expectAllClose(fitted.transform(rows(F.Xtest)).flatMap((r) => Array.from(r)), F.scaledTest.flat(), { rtol: 1e-12, atol: 1e-12 });
    const art = fitted.toArtifact();
    expect(art.kind).toBe('standardize');
  });

  it('anovaF equals f_classif, NaN for a constant feature; selection keeps the top k', () => {
    const f = anovaF(rows(F.X), Uint8Array.from(F.y));
    // Source: tests/fixtures/baselines/stages.json (sklearn f_classif; null = NaN). rtol 1e-9: f_classif
    // forms sums of squares by subtraction (cancellation for F near 0), we sum squared deviations.
    expectAllClose(f, F.fClassif.map((v) => v ?? NaN), { rtol: 1e-9 });
    const sel = selectKBestStage({ k: 4 }).fit(rows(F.X), Uint8Array.from(F.y));
    // Source: same fixture (SelectKBest(f_classif, k=4).get_support()).
    expect(Array.from(sel.indices)).toEqual(F.selected4);
  });

  it('a standardize + select pipeline survives a JSON round trip', () => {
    const x = rows(F.X), y = Uint8Array.from(F.y);
    const p = fitPipeline([standardizeStage(), selectKBestStage({ k: 3 })], x, y);
    const back = pipelineFromArtifact<FeatureRows>(JSON.parse(JSON.stringify(p.toArtifact())));
    // Source: pipeline contract (exact artifact round trip).
    expect(back.transform(x)).toEqual(p.transform(x));
  });
});

describe('band-pass stage and recording filter against SciPy', () => {
  const params = { order: B.order, lowHz: B.lowHz, highHz: B.highHz, sampleRateHz: B.sampleRateHz };
  it('designs scipy.signal.butter(4, [8, 30], bandpass, fs=160) and filters each epoch causally', () => {
    // Source: tests/fixtures/baselines/stages.json (butter(..., output='sos')).
    expectAllClose(bandpassSos(params).flat(), B.sos.flat(), { rtol: 1e-10, atol: 1e-14 });
    const x: Epochs = B.epochs.map((t) => t.map((c) => Float64Array.from(c)));
    const y = bandpassStage(params).fit(x).transform(x);
    // Source: same fixture (scipy.signal.sosfilt per epoch, zero initial state).
    expectAllClose(y.flatMap((t) => t.flatMap((c) => Array.from(c))), B.sosfiltEpochs.flat(2), { rtol: 1e-9, atol: 1e-9 });
  });

  it('filters a continuous recording causally or zero-phase', () => {
    const rec: Recording = { channelNames: ['A', 'B'], sampleRateHz: B.sampleRateHz, annotations: [], startTime: null,
                             data: B.continuous.map((c) => Float64Array.from(c)) };
    const zp = filterRecording(rec, params, true);
    // Source: tests/fixtures/baselines/stages.json (scipy.signal.sosfiltfilt, default padding).
    expectAllClose(zp.data.flatMap((c) => Array.from(c)), B.sosfiltfiltContinuous.flat(), { rtol: 1e-8, atol: 1e-9 });
    // Source: STYLE.md §4 (does not modify its input).
    expect(Array.from(rec.data[0]!)).toEqual(B.continuous[0]);
  });

  it('stores its coefficients in the artifact', () => {
    const x: Epochs = B.epochs.map((t) => t.map((c) => Float64Array.from(c)));
    const p = fitPipeline([bandpassStage(params)], x, Uint8Array.of(0, 1));
    const back = pipelineFromArtifact<Epochs>(JSON.parse(JSON.stringify(p.toArtifact())));
    // Source: STYLE.md §3 (design functions return data; the artifact stores it).
    expect(back.transform(x)).toEqual(p.transform(x));
  });
});

describe('epochRecording', () => {
  const fs = 160;
  const ramp = Float64Array.from({ length: 1600 }, (_, i) => i);
  const rec: Recording = {
    channelNames: ['C3', 'C4'], sampleRateHz: fs, startTime: null,
    data: [ramp, ramp.map((v) => -v)],
    annotations: [
      { onsetS: 4.2, durationS: 4.1, text: 'T2' }, { onsetS: 0, durationS: 4.2, text: 'T0' },
      { onsetS: 1.003, durationS: 4.1, text: 'T1 ' }, { onsetS: 9.5, durationS: 4.1, text: 'T1' },
    ],
  };

  it('cuts round(onset·fs) + round(tmin·fs) onwards for round(tmax·fs) - round(tmin·fs) samples', () => {
    const e = epochRecording(rec, { classes: ['T1', 'T2'] }, 0.5, 2.5);
    // Source: module rule in shared/decoder/epochs.ts (1.003 s -> sample 160 (160.48 rounds down), +80).
    expect(checkEpochs(e.epochs)).toEqual({ trials: 2, channels: 2, samples: 320 });
    expect(e.epochs[0]![0]![0]).toBe(160 + 80);
    expect(e.epochs[1]![0]![0]).toBe(672 + 80);
    expect(Array.from(e.labels)).toEqual([0, 1]);
    expect(Array.from(e.onsetsS)).toEqual([1, 4.2]);
    // The 9.5 s cue needs samples up to 1920 > 1600: dropped and reported.
    expect(e.dropped).toEqual([{ cue: 2, onsetS: 9.5 }]);
  });

  it('accepts explicit sample cues and negative tmin, and copies the samples', () => {
    const e = epochRecording(rec, [{ sample: 400, label: 1 }], -0.25, 0.25);
    // Source: same rule (400 - 40 = 360, 80 samples).
    expect(e.epochs[0]![1]![0]).toBe(-360);
    expect(e.epochs[0]![0]!.length).toBe(80);
    e.epochs[0]![0]![0] = 0;
    // Source: STYLE.md §4 (does not modify its input).
    expect(rec.data[0]![360]).toBe(360);
    expect(() => epochRecording(rec, [{ sample: 1.5, label: 0 }], 0, 1)).toThrow(/sample/);
    expect(() => epochRecording(rec, [], 1, 1)).toThrow(/tmaxS/);
  });
});
