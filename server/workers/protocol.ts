/**
 * Messages between the server and a training worker thread (structured clone; typed arrays are
 * copied or transferred). One worker runs one task and exits.
 */
import type { CovarianceMap } from '../../shared/decoder/recipes/covariance-map';
import type { DecoderInterpretation } from '../../shared/api/decoders';
import type { Recipe } from '../../shared/api/studies';
import type { EdfFormat } from '../../shared/formats/edf';
import type { Annotation, ChannelMajor, Recording } from '../../shared/types';

/** What the recordings table keeps of a parsed file (no samples). */
export type RecordingFileFacts = Pick<Recording, 'channelNames' | 'sampleRateHz' | 'annotations'> & { format: EdfFormat; sampleCount: number };

export function recordingFileFacts(rec: Recording, format: EdfFormat): RecordingFileFacts {
  return { channelNames: rec.channelNames, sampleRateHz: rec.sampleRateHz, annotations: rec.annotations, format,
           sampleCount: rec.data[0]?.length ?? 0 };
}

/** One stored recording as the worker receives it: its file bytes, or its samples. Cues from the cue table. */
export type TrainingRecordingInput =
  | { id: number; name: string; kind: 'file'; bytes: Uint8Array; annotations: Annotation[] }
  | { id: number; name: string; kind: 'samples'; channelNames: string[]; sampleRateHz: number; data: ChannelMajor; annotations: Annotation[] };

/** What to fit: the study's protocol plus the job's choices. */
export interface TrainOptions {
  recipe: Recipe;
  /** The study's cue classes, in order: the decoder's output classes. */
  classes: string[];
  /** Annotation text of each class in the recordings (same order as `classes`). */
  annotationClasses: string[];
  /** The study's montage, canonical names, in order: the decoder reads these channels. */
  channelNames: string[];
  sampleRateHz: number;
  epochStartS: number;
  epochEndS: number;
  powerLineHz: 50 | 60;
  folds: number;
  inner: number;
  seed: number;
  components?: number;
  prior?: boolean;
  covarianceMap?: CovarianceMap;
}

export type TrainTask =
  | { kind: 'train'; recordings: TrainingRecordingInput[]; options: TrainOptions }
  /** Simulate a calibration recording from a simulator profile (seeded), send it back as EDF+C, train on it. */
  | { kind: 'simulate-and-train'; profile: unknown; simulationSeed: number; options: TrainOptions };

/** Headline facts of a sealed artifact, for the decoders table. */
export interface ArtifactFacts {
  recipe: Recipe;
  classes: string[];
  channelNames: string[];
  sampleRateHz: number;
  epochStartS: number;
  epochEndS: number;
}

export interface TrainResult {
  /** The artifact JSON exactly as sealed. */
  artifactText: string;
  sha256: string;
  facts: ArtifactFacts;
  report: Record<string, unknown>;
  interpretation: DecoderInterpretation | null;
}

export type WorkerRequest = { type: 'run'; task: TrainTask };

export type WorkerMessage =
  | { type: 'progress'; fraction: number; stage: string }
  /** simulate-and-train: the simulated recording, EDF+C bytes and what was read back from them, before training starts. */
  | { type: 'recording'; bytes: Uint8Array; name: string; facts: RecordingFileFacts }
  | { type: 'result'; result: TrainResult }
  | { type: 'error'; message: string };
