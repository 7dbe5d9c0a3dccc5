// `aftercue predict`: replays an EDF/BDF recording through a frozen decoder exactly as a live
// feed would run it (raw one-second chunks into the decoder's stream, a prediction as soon as
// each cue's epoch is complete) and prints the trials and the accuracy as JSON.
import { readFileSync } from 'node:fs';
import type { Command } from 'commander';
import { loadDecoder, predictRecording } from '../../shared/decoder/predict';
import { parseClasses, readRecording } from './train';

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
