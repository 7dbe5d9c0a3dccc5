/**
 * From a stored decoder's sealed artifact text to the live decoder: `loadDecoder`
 * (shared/decoder/predict.ts) verifies the SHA-256 seal and builds the decision function.
 */
import { loadDecoder } from '../../shared/decoder/predict';
import type { DecoderRow } from '../db/schema';
import { liveDecoderFromLoaded, type LiveDecoder } from './live-decoder';

/** The live decoder of a sealed artifact (parsed JSON); throws ArtifactIntegrityError or ShapeError. */
export function liveDecoderFromArtifact(artifact: unknown): LiveDecoder {
  return liveDecoderFromLoaded(loadDecoder(artifact));
}

/** The engine's default loader: the row's sealed artifact text. */
export function defaultDecoderLoader(row: DecoderRow): LiveDecoder {
  return liveDecoderFromArtifact(JSON.parse(row.artifact) as unknown);
}
