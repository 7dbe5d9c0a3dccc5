// `aftercue predict`: replays an EDF/BDF recording through a frozen decoder exactly as a live
// feed would run it (raw one-second chunks into the decoder's stream, a prediction as soon as
// each cue's epoch is complete) and prints the trials and the accuracy as JSON.
import { readFileSync } from 'node:fs';
import type { Command } from 'commander';
import { channelsInOrder } from '../../shared/decoder/online';
import { createDecoderStream, loadDecoder, type LoadedDecoder } from '../../shared/decoder/predict';
import type { Recording } from '../../shared/types';
import { parseClasses, readRecording } from './train';

export interface PredictedTrial {
  onsetS: number;
  trueClass: string;
  predictedClass: string;
  /** Probability of the predicted class. */
  probability: number;
  /** P of each class, by name. */
  probabilities: Record<string, number>;
}

export interface PredictOutput {
  decoder: { recipe: string; sha256: string; classes: string[] };
  trials: PredictedTrial[];
  accuracy: number | null;
  /** Cues whose epoch lies outside the recording. */
  skipped: { onsetS: number; trueClass: string }[];
}

/**
 * Streams `rec` through the decoder in chunks of `chunkS` seconds and predicts at each cue whose
 * annotation text is one of `classes`.
 */
export function predictRecording(decoder: LoadedDecoder, rec: Recording, classes: readonly string[], chunkS = 1): PredictOutput {
  for (const c of classes) {
    if (!decoder.classes.includes(c)) throw new Error(`class '${c}' is not one of the decoder's classes (${decoder.classes.join(', ')})`);
  }
  if (rec.sampleRateHz !== decoder.preprocess.sampleRateHz) {
    throw new Error(`recording is sampled at ${rec.sampleRateHz} Hz, the decoder expects ${decoder.preprocess.sampleRateHz} Hz`);
  }
  const data = channelsInOrder(rec, decoder.preprocess.channelNames);
  const total = data[0]?.length ?? 0;
  const fs = rec.sampleRateHz;
  const cues = rec.annotations.filter((a) => classes.includes(a.text.trim()))
    .map((a) => ({ onsetS: a.onsetS, trueClass: a.text.trim(), sample: Math.round(a.onsetS * fs) }))
    .sort((a, b) => a.sample - b.sample);
  const stream = createDecoderStream(decoder, { historyS: 60 });
  const trials: PredictedTrial[] = [];
  const skipped: PredictOutput['skipped'] = [];
  const pending = cues.filter((c) => {
    const start = c.sample + decoder.epochOffset;
    const ok = start >= 0 && start + decoder.epochLength <= total;
    if (!ok) skipped.push({ onsetS: c.onsetS, trueClass: c.trueClass });
    return ok;
  });
  const step = Math.max(1, Math.round(chunkS * fs));
  let next = 0;
  for (let s = 0; s < total; s += step) {
    stream.push(data.map((ch) => ch.subarray(s, Math.min(total, s + step))));
    while (next < pending.length) {
      const cue = pending[next]!;
      const p = stream.predictAt(cue.sample);
      if (p === null) break;
      trials.push({ onsetS: cue.onsetS, trueClass: cue.trueClass, predictedClass: p.predictedClass, probability: p.confidence,
                    probabilities: { [decoder.classes[0]]: 1 - p.probability, [decoder.classes[1]]: p.probability } });
      next++;
    }
  }
  const correct = trials.filter((t) => t.predictedClass === t.trueClass).length;
  return { decoder: { recipe: decoder.artifact.recipe, sha256: decoder.artifact.sha256, classes: [...decoder.classes] },
           trials, accuracy: trials.length > 0 ? correct / trials.length : null, skipped };
}

export function register(program: Command): void {
  program
    .command('predict')
    .description('run a frozen decoder over a recording as a live session would, printing each cue\'s prediction as JSON')
    .requiredOption('--model <MODEL.json>', 'sealed decoder artifact written by `aftercue train`')
    .requiredOption('--edf <file>', 'EDF/EDF+/BDF recording with cue annotations')
    .requiredOption('--classes <A,B>', 'cue annotation texts to predict (the decoder\'s class names)', parseClasses)
    .action((o: { model: string; edf: string; classes: [string, string] }) => {
      const decoder = loadDecoder(JSON.parse(readFileSync(o.model, 'utf8')) as unknown);
      const out = predictRecording(decoder, readRecording(o.edf), o.classes);
      process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
    });
}
