/**
 * Cutting cue-locked epochs out of a continuous recording, and checking epoch shapes.
 *
 * Sample-exact rule: a cue at onsetS (seconds from sample 0) maps to sample round(onsetS·fs);
 * the epoch starts at that sample + round(tminS·fs) and has round(tmaxS·fs) - round(tminS·fs)
 * samples (tmax exclusive). So 0.5-2.5 s at 160 Hz gives 320 samples starting 80 samples after
 * the cue sample, and every epoch of a recording has the same length. Epochs reaching outside
 * the recording are dropped and listed in `dropped`. Math.round rounds halves up.
 */
import { ParamError, ShapeError, type Epochs, type Recording } from '../types';

/** One cue by sample index (already on the recording's sample grid) and class index. */
export interface SampleCue {
  sample: number;
  label: number;
}

/** Pick cues from the recording's annotations: text (trimmed) equal to classes[k] gives label k. */
export interface AnnotationCues {
  classes: readonly string[];
}

export interface EpochedTrials {
  epochs: Epochs; // [trial][channel][sample], µV
  labels: Uint8Array; // [trial], class index
  onsetsS: Float64Array; // [trial], cue time from sample 0 (s)
  /** Cues whose window fell outside the recording: their position in cue order and onset. */
  dropped: { cue: number; onsetS: number }[];
}

/**
 * Epochs around cues (see the module comment for the sample rule).
 * @param cues explicit sample cues, or `{ classes }` to take them from the annotations
 * @param tminS window start relative to the cue (s), may be negative
 * @param tmaxS window end relative to the cue (s), > tminS; exclusive
 * @returns copies of the samples (the recording is not modified)
 */
export function epochRecording(rec: Recording, cues: readonly SampleCue[] | AnnotationCues,
                               tminS: number, tmaxS: number): EpochedTrials {
  const fs = rec.sampleRateHz;
  if (!(fs > 0)) throw new ParamError('rec.sampleRateHz', `expected > 0, got ${fs}`);
  if (!(Number.isFinite(tminS) && Number.isFinite(tmaxS))) throw new ParamError('tminS', `expected finite times, got ${tminS}, ${tmaxS}`);
  const offset = Math.round(tminS * fs);
  const length = Math.round(tmaxS * fs) - offset;
  if (length < 1) throw new ParamError('tmaxS', `expected a window of at least one sample, got [${tminS}, ${tmaxS}) s at ${fs} Hz`);
  const total = rec.data[0]?.length ?? 0;
  for (let c = 0; c < rec.data.length; c++) {
    if (rec.data[c]!.length !== total) throw new ShapeError(`rec.data[${c}]`, `expected ${total} samples, got ${rec.data[c]!.length}`);
  }
  const list = resolveCues(rec, cues);
  const epochs: Epochs = [], labels: number[] = [], onsets: number[] = [];
  const dropped: { cue: number; onsetS: number }[] = [];
  list.forEach((cue, i) => {
    const start = cue.sample + offset;
    const onsetS = cue.sample / fs;
    if (start < 0 || start + length > total) { dropped.push({ cue: i, onsetS }); return; }
    epochs.push(rec.data.map((ch) => ch.slice(start, start + length)));
    labels.push(cue.label);
    onsets.push(onsetS);
  });
  return { epochs, labels: Uint8Array.from(labels), onsetsS: Float64Array.from(onsets), dropped };
}

function resolveCues(rec: Recording, cues: readonly SampleCue[] | AnnotationCues): SampleCue[] {
  if (!Array.isArray(cues)) {
    const { classes } = cues as AnnotationCues;
    if (classes.length < 1 || classes.length > 256) throw new ParamError('classes', `expected 1 to 256 class names, got ${classes.length}`);
    const out: SampleCue[] = [];
    for (const a of [...rec.annotations].sort((x, y) => x.onsetS - y.onsetS)) {
      const k = classes.indexOf(a.text.trim());
      if (k >= 0) out.push({ sample: Math.round(a.onsetS * rec.sampleRateHz), label: k });
    }
    return out;
  }
  return (cues as readonly SampleCue[]).map((c, i) => {
    if (!Number.isInteger(c.sample)) throw new ParamError(`cues[${i}].sample`, `expected an integer sample index, got ${c.sample}`);
    if (!Number.isInteger(c.label) || c.label < 0 || c.label > 255) {
      throw new ParamError(`cues[${i}].label`, `expected a class index 0..255, got ${c.label}`);
    }
    return c;
  });
}

/**
 * Checks that epochs are [trial][channel][sample] with equal channel and sample counts.
 * @returns the counts
 */
export function checkEpochs(epochs: Epochs, field = 'epochs', channels?: number): {
  trials: number; channels: number; samples: number;
} {
  const c = channels ?? epochs[0]?.length ?? 0;
  const s = epochs[0]?.[0]?.length ?? 0;
  epochs.forEach((trial, i) => {
    if (trial.length !== c) throw new ShapeError(`${field}[${i}]`, `expected ${c} channels, got ${trial.length}`);
    trial.forEach((ch, j) => {
      if (ch.length !== s) throw new ShapeError(`${field}[${i}][${j}]`, `expected ${s} samples, got ${ch.length}`);
    });
  });
  return { trials: epochs.length, channels: c, samples: s };
}
