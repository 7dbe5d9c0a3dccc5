/**
 * From a stored decoder's artifact text to the live decoder: the pre-processing spec, the epoch
 * window, the classes and the fitted pipeline (rebuilt by pipelineFromArtifact, whose stage
 * kinds register themselves when their modules are imported).
 *
 * Artifact layout read here: { classes: string[], preprocess: PreprocessSpec,
 * window: { tminS, tmaxS }, pipeline: PipelineArtifact } (other fields ignored).
 */
import '../../shared/decoder/baselines';
import '../../shared/decoder/recipes/covariance';
import type { EpochWindow, PreprocessSpec } from '../../shared/decoder/online';
import { pipelineFromArtifact } from '../../shared/decoder/pipeline';
import type { Epochs } from '../../shared/types';
import type { DecoderRow } from '../db/schema';
import { liveDecoderFromParts, type LiveDecoder } from './live-decoder';

function record(v: unknown, field: string): Record<string, unknown> {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) throw new TypeError(`${field}: expected an object`);
  return v as Record<string, unknown>;
}

/** The live decoder of a parsed artifact (throws TypeError naming the field at fault). */
export function liveDecoderFromArtifact(artifact: unknown): LiveDecoder {
  const a = record(artifact, 'artifact');
  const classes = a.classes;
  if (!Array.isArray(classes) || !classes.every((c) => typeof c === 'string')) throw new TypeError('artifact.classes: expected strings');
  const p = record(a.preprocess, 'artifact.preprocess');
  const w = record(a.window, 'artifact.window');
  if (typeof w.tminS !== 'number' || typeof w.tmaxS !== 'number') throw new TypeError('artifact.window: expected tminS and tmaxS');
  const spec = p as unknown as PreprocessSpec;
  if (typeof spec.sampleRateHz !== 'number' || !Array.isArray(spec.channelNames) || !Array.isArray(record(spec.bandpass, 'artifact.preprocess.bandpass').sos)) {
    throw new TypeError('artifact.preprocess: expected sampleRateHz, channelNames and bandpass.sos');
  }
  const window: EpochWindow = { tminS: w.tminS, tmaxS: w.tmaxS };
  return liveDecoderFromParts({ classes: classes as string[], preprocess: spec, window, pipeline: pipelineFromArtifact<Epochs>(a.pipeline) });
}

/** The engine's default loader: the row's sealed artifact text. */
export function defaultDecoderLoader(row: DecoderRow): LiveDecoder {
  return liveDecoderFromArtifact(JSON.parse(row.artifact) as unknown);
}
