/**
 * One training task, as a training worker thread runs it: read the recordings (EDF bytes or
 * samples), put the study's channels in the study's order, keep the class cues (annotation texts
 * mapped to the study's classes), fit with nested cross-validation (shared/decoder/train), seal
 * the artifact and derive its interpretation. Also runs in-process (tests), it is plain code.
 */
import { edfToRecording, readEdf, writeEdfPlus } from '../../shared/formats/edf';
import { channelsInOrder } from '../../shared/decoder/online';
import { ShapeError, type Annotation, type Recording } from '../../shared/types';
import { simulateRecording } from '../../simulator/offline';
import { fitDecoder } from './fit';
import { recordingFileFacts, type RecordingFileFacts, type TrainingRecordingInput, type TrainOptions, type TrainResult, type TrainTask } from './protocol';

export interface TaskEmitter {
  progress(fraction: number, stage: string): void;
  /** Hands out a recording file; `bytes` may be transferred (unusable afterwards). */
  recording(bytes: Uint8Array, name: string, facts: RecordingFileFacts): void;
}

/** Share of the progress bar spent reading (or simulating) the data before fitting. */
const DATA_SHARE = 0.05;
const SIMULATION_SHARE = 0.1;

function fromInput(input: TrainingRecordingInput): Recording {
  if (input.kind === 'samples') {
    return { channelNames: input.channelNames, sampleRateHz: input.sampleRateHz, data: input.data, annotations: input.annotations, startTime: null };
  }
  // The stored cue table is the source of truth for cues (it is what the recording's cue counts show).
  return { ...edfToRecording(readEdf(input.bytes)), annotations: input.annotations };
}

/**
 * The study's channels in the study's order, at the study's rate, with only the class cues,
 * relabelled to the study's class names.
 * @throws ShapeError naming the missing channel or the rate that differs
 */
export function prepareRecording(rec: Recording, o: TrainOptions, name: string): Recording {
  if (Math.abs(rec.sampleRateHz - o.sampleRateHz) > 1e-9) {
    throw new ShapeError('sampleRateHz', `${name} is sampled at ${rec.sampleRateHz} Hz, the study at ${o.sampleRateHz} Hz`);
  }
  let data;
  try { data = channelsInOrder(rec, o.channelNames); }
  catch (err) { throw err instanceof ShapeError ? new ShapeError('channelNames', `${name}: ${err.message}`) : err; }
  const classOf = new Map(o.annotationClasses.map((text, i) => [text, o.classes[i]!]));
  const annotations: Annotation[] = [];
  for (const a of rec.annotations) {
    const cls = classOf.get(a.text.trim());
    if (cls !== undefined) annotations.push({ onsetS: a.onsetS, durationS: a.durationS, text: cls });
  }
  return { channelNames: [...o.channelNames], sampleRateHz: rec.sampleRateHz, data, annotations, startTime: rec.startTime };
}

/** Simulates the calibration run, hands its EDF+C bytes out, and returns the recording as read back from them. */
function simulate(task: Extract<TrainTask, { kind: 'simulate-and-train' }>, emit: TaskEmitter): Recording {
  emit.progress(0, 'simulating a calibration recording');
  const { recording } = simulateRecording(task.profile, { seed: task.simulationSeed });
  const bytes = writeEdfPlus(recording, { format: 'EDF+C', recordingCode: 'simulated' });
  // Train on exactly what is stored: the EDF+C read back (16-bit quantised), not the float original.
  const file = readEdf(bytes);
  const stored = edfToRecording(file);
  const trials = recording.annotations.length;
  emit.recording(bytes, `Simulated calibration run (${trials} cues, seed ${task.simulationSeed})`, recordingFileFacts(stored, file.format));
  return stored;
}

/** Runs the task; progress goes out through `emit`, the sealed result is returned. */
export function runTrainTask(task: TrainTask, emit: TaskEmitter): TrainResult {
  let raw: { rec: Recording; name: string }[];
  let start: number;
  if (task.kind === 'simulate-and-train') {
    raw = [{ rec: simulate(task, emit), name: 'the simulated recording' }];
    start = SIMULATION_SHARE;
  } else {
    emit.progress(0, 'reading recordings');
    raw = task.recordings.map((input) => ({ rec: fromInput(input), name: input.name }));
    start = DATA_SHARE;
  }
  const recordings = raw.map(({ rec, name }) => prepareRecording(rec, task.options, name));
  return fitDecoder(recordings, task.options, raw.map((r) => r.name),
    (fraction, stage) => emit.progress(start + (1 - start) * fraction, stage));
}
