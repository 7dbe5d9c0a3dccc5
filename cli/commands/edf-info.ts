// `aftercue edf-info FILE`: header and annotations of an EDF/EDF+/BDF file as one JSON object.
// Reads the header and the annotation signals only; the ordinary signals are never decoded.
import { readFileSync } from 'node:fs';
import type { Command } from 'commander';
import { EdfFormatError, readEdfAnnotations } from '../../shared/formats/edf';

export interface EdfInfo {
  format: string;
  startTime: string;
  recordDurationS: number;
  records: number;
  signals: {
    label: string; transducer: string; physicalDimension: string; sampleRateHz: number;
    physicalMin: number; physicalMax: number; digitalMin: number; digitalMax: number; prefiltering: string;
  }[];
  annotations: { onsetS: number; durationS: number | null; text: string }[];
}

export function edfInfo(bytes: Uint8Array): EdfInfo {
  const { header, annotations } = readEdfAnnotations(bytes, { maxBytes: Number.MAX_SAFE_INTEGER });
  return {
    format: header.format,
    startTime: header.startTime,
    recordDurationS: header.recordDurationS,
    records: header.records,
    signals: header.signals.map((s) => ({
      label: s.label, transducer: s.transducer, physicalDimension: s.physicalDimension, sampleRateHz: s.sampleRateHz,
      physicalMin: s.physicalMin, physicalMax: s.physicalMax, digitalMin: s.digitalMin, digitalMax: s.digitalMax,
      prefiltering: s.prefiltering,
    })),
    annotations: annotations.map((a) => ({ onsetS: a.onsetS, durationS: a.durationS, text: a.text })),
  };
}

export function register(program: Command): void {
  program
    .command('edf-info')
    .description('print the header and annotations of an EDF, EDF+ or BDF file as JSON')
    .argument('<file>', 'EDF, EDF+ or BDF file')
    .action((file: string) => {
      let bytes: Uint8Array;
      try {
        bytes = readFileSync(file);
      } catch (err) {
        const code = (err as NodeJS.ErrnoException).code ?? 'read error';
        process.stderr.write(`aftercue edf-info: cannot read ${file} (${code})\n`);
        process.exitCode = 1;
        return;
      }
      try {
        process.stdout.write(`${JSON.stringify(edfInfo(bytes), null, 2)}\n`);
      } catch (err) {
        if (!(err instanceof EdfFormatError)) throw err;
        process.stderr.write(`aftercue edf-info: ${file}: not a valid EDF/BDF file: ${err.message}\n`);
        process.exitCode = 2;
      }
    });
}
