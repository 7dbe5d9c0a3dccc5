import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadDecoder, createDecoderStream } from '../../../shared/decoder/predict';
import { channelsInOrder } from '../../../shared/decoder/online';
import { simulateRecording } from '../../../simulator/offline';
import { liveDecoderFromLoaded } from '../../../server/live/live-decoder';
import { SampleRing } from '../../../server/live/ring';
import { trainDecoderWithArtifact } from './helpers/decoder';

const PROFILE = JSON.parse(readFileSync(new URL('../../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown>;

describe('the live decoder', () => {
  it("filters exactly as the decoder's own stream (createDecoderStream) and predicts as its predictAt", () => {
    const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 16 });
    const { artifact } = trainDecoderWithArtifact(recording, { classes: ['left-hand', 'right-hand'], window: { tminS: 0.5, tmaxS: 2.5 },
      car: true, notchHz: 50 });
    const loaded = loadDecoder(JSON.parse(JSON.stringify(artifact)) as unknown);
    const live = liveDecoderFromLoaded(loaded);
    const { recording: run } = simulateRecording(PROFILE, { seed: 17, seconds: 40 });
    const raw = channelsInOrder(run, live.channelNames);
    const reference = createDecoderStream(loaded, { historyS: 60 });
    const filter = live.createFilter();
    const ring = new SampleRing(raw.length, raw[0]!.length);
    // Irregular chunks, the same for both.
    for (let s = 0, k = 0; s < raw[0]!.length; k++) {
      const n = Math.min(1 + ((k * 131) % 97), raw[0]!.length - s);
      const chunk = raw.map((ch) => ch.slice(s, s + n));
      reference.push(chunk);
      ring.write(filter.push(chunk), n);
      s += n;
    }
    const cues = [1000, 2500, 4000, 6321, 8000];
    for (const cue of cues) {
      const epoch = reference.epochAt(cue)!;
      const mine = ring.read(cue + live.epoch.offset, live.epoch.length);
      // shared/decoder/online.ts is the reference: the engine's filter must give the same samples, bit for bit.
      mine.forEach((ch, c) => expect(Array.from(ch)).toEqual(Array.from(epoch.data[c]!)));
      // And the same probability as the decoder stream's own predictAt.
      expect(live.predictEpoch(mine)[1]).toBe(reference.predictAt(cue)!.probability);
    }
  }, 60_000);
});
