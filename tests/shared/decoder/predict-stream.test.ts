import { describe, expect, it } from 'vitest';
import { epochRecording } from '../../../shared/decoder/epochs';
import { channelOrder, channelsInOrder, preprocessRecording } from '../../../shared/decoder/online';
import {
  createDecoderStream, loadDecoder, predictFilteredEpoch, predictRawEpoch, predictRecording, type RawSegment,
} from '../../../shared/decoder/predict';
import { createRng } from '../../../shared/linalg/random';
import { ParamError, ShapeError } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';
import { fittedDecoder } from '../../fixtures/decoder/fitted';
import { syntheticRecording } from '../../fixtures/decoder/synthetic';

describe.each(['covariance', 'component-tf'] as const)('the %s decoder online', (recipe) => {
  const { artifact } = fittedDecoder(recipe);
  const decoder = loadDecoder(artifact);
  // A new recording the decoder has never seen (another seed).
  const rec = syntheticRecording({ seed: 9, trials: 12 });
  const fs = rec.sampleRateHz;
  const offline = epochRecording(preprocessRecording(decoder.preprocess, rec), { classes: ['left', 'right'] },
                                 decoder.window.tminS, decoder.window.tmaxS);
  const cues = Array.from(offline.onsetsS, (s) => Math.round(s * fs));
  const offlineP = Float64Array.from(offline.epochs, (data, i) => predictFilteredEpoch(decoder, { kind: 'filtered-epoch', data, cueSample: cues[i]!, filledSamples: 0 }).probability);

  it('gives the offline probabilities when fed in random chunks, empty and one-sample chunks included', () => {
    const rng = createRng(recipe === 'covariance' ? 1 : 2);
    const data = channelsInOrder(rec, decoder.preprocess.channelNames);
    const total = data[0]!.length;
    const stream = createDecoderStream(decoder);
    const online = new Float64Array(cues.length).fill(NaN);
    let next = 0;
    for (let s = 0; s < total;) {
      const r = rng.nextInt(10);
      const len = r === 0 ? 0 : r === 1 ? 1 : rng.nextInt(300);
      stream.push(data.map((ch) => ch.subarray(s, Math.min(total, s + len))));
      s += len;
      while (next < cues.length) {
        const p = stream.predictAt(cues[next]!);
        if (p === null) break;
        online[next++] = p.probability;
      }
    }
    // Common practice check: every cue was predicted, and the decoder is not constant.
    expect(next).toBe(cues.length);
    expect(new Set(online).size).toBeGreaterThan(1);
    // Source: STYLE.md §3 (live and offline run the same code); tolerance 1e-9 per the brief.
    expectAllClose(online, offlineP, { rtol: 0, atol: 1e-9 });
  });

  it('replays a recording through the stream as the CLI does, with the offline accuracy', () => {
    const out = predictRecording(decoder, rec, ['left', 'right'], 0.37);
    // Source: invariant (predictRecording streams with predictAt; same numbers as offline).
    expectAllClose(out.trials.map((t) => t.probabilities.right!), offlineP, { rtol: 0, atol: 1e-9 });
    const correct = offline.labels.reduce((c, l, i) => c + ((offlineP[i]! > 0.5 ? 1 : 0) === l ? 1 : 0), 0);
    expect(out.accuracy).toBeCloseTo(correct / cues.length, 12);
  });

  it('predicts a raw segment that starts at the recording start exactly as the stream', () => {
    const data = channelsInOrder(rec, decoder.preprocess.channelNames);
    const i = 3;
    const end = cues[i]! + decoder.epochOffset + decoder.epochLength;
    const segment: RawSegment = { kind: 'raw-segment', data: data.map((ch) => ch.slice(0, end)), cueIndex: cues[i]! };
    // Source: online.ts (a raw segment is filtered from a fresh steady state, like a stream starting there).
    expectAllClose([predictRawEpoch(decoder, segment).probability], [offlineP[i]!], { rtol: 0, atol: 1e-9 });
  });

  it('refuses a raw segment where a filtered epoch is expected, and the reverse', () => {
    const epoch = { kind: 'filtered-epoch' as const, data: offline.epochs[0]!, cueSample: cues[0]!, filledSamples: 0 };
    const raw: RawSegment = { kind: 'raw-segment', data: offline.epochs[0]!, cueIndex: 0 };
    // Source: predict.ts (the kind tag makes the filtered-vs-raw distinction explicit).
    expect(() => predictFilteredEpoch(decoder, raw as never)).toThrow(ParamError);
    expect(() => predictRawEpoch(decoder, epoch as never)).toThrow(ParamError);
  });
});

describe('the decoder stream', () => {
  it('holds missing samples the same way live and offline, and counts them for the epochs they touch', () => {
    const decoder = loadDecoder(fittedDecoder('component-tf').artifact);
    const rec = syntheticRecording({ seed: 13, trials: 6 });
    const fs = rec.sampleRateHz;
    const cue = Math.round(rec.annotations[3]!.onsetS * fs);
    const gapStart = cue + decoder.epochOffset - 60;
    rec.data[4]!.fill(NaN, gapStart, gapStart + 40); // a dropped stretch on one channel, 60 samples before the epoch
    const offline = epochRecording(preprocessRecording(decoder.preprocess, rec), { classes: ['left', 'right'] }, decoder.window.tminS, decoder.window.tmaxS);
    const stream = createDecoderStream(decoder, { historyS: 60 });
    stream.push(channelsInOrder(rec, decoder.preprocess.channelNames));
    const cues = Array.from(offline.onsetsS, (s) => Math.round(s * fs));
    const online = cues.map((c) => stream.predictAt(c)!);
    const offP = offline.epochs.map((data, i) => predictFilteredEpoch(decoder, { kind: 'filtered-epoch', data, cueSample: cues[i]!, filledSamples: 0 }).probability);
    // Source: online.ts (missing samples held before filtering, identically live and offline).
    expectAllClose(online.map((p) => p.probability), offP, { rtol: 0, atol: 1e-9 });
    expect(online.every((p) => Number.isFinite(p.probability))).toBe(true);
    // Same source: the 40 filled samples lie within the second before cue 3's epoch; other epochs are untouched.
    expect(online.map((p) => p.filledSamples)).toEqual(cues.map((c) => (c === cue ? 40 : 0)));
  });


  it('returns null until the last sample of the epoch has arrived, then the epoch', () => {
    const decoder = loadDecoder(fittedDecoder('covariance').artifact);
    const c = decoder.preprocess.channelNames.length;
    const stream = createDecoderStream(decoder, { historyS: 1 });
    const cue = 200;
    const last = cue + decoder.epochOffset + decoder.epochLength; // one past the last sample
    stream.push(Array.from({ length: c }, () => new Float64Array(last - 1).fill(3)));
    // Source: online.ts sample rule (complete once sample start + length − 1 has arrived).
    expect(stream.epochAt(cue)).toBeNull();
    stream.push(Array.from({ length: c }, () => new Float64Array(1).fill(3)));
    expect(stream.epochAt(cue)?.data[0]!.length).toBe(decoder.epochLength);
    stream.push(Array.from({ length: c }, () => new Float64Array(2000)));
    // Same source: older than the history held is an error, not a silent wrong epoch.
    expect(() => stream.epochAt(cue)).toThrow(ParamError);
  });
});

describe('channelOrder', () => {
  it('matches a feed\'s labels to the decoder\'s channels by 10-10 name', () => {
    // Source: ../shared/data/eegmmidb/README.md labels ('C3..', 'Fc5.') and shared/montage normaliseChannelName.
    expect(Array.from(channelOrder(['C3..', 'Fc5.', 'Cz..'], ['FC5', 'Cz', 'C3']))).toEqual([1, 2, 0]);
    expect(() => channelOrder(['C3..'], ['C4'])).toThrow(ShapeError);
  });
});
