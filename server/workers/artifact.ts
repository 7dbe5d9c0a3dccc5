/**
 * The server's view of a decoder artifact (shared/decoder/artifact.ts): reading a sealed
 * artifact (seal, format and shapes checked), the facts the decoders table keeps, the
 * interpretation in the API's shape, and re-verifying stored text. Used by the import route and
 * by the training worker.
 */
import type { DecoderInterpretation } from '../../shared/api/decoders';
import { ArtifactIntegrityError, parseArtifact, serialiseArtifact, verifyArtifact, type DecoderArtifact } from '../../shared/decoder/artifact';
import { interpretDecoder } from '../../shared/decoder/interpret';
import { ParamError, ShapeError } from '../../shared/types';
import type { ArtifactFacts } from './protocol';

/** A refused artifact: 'artifact-hash-mismatch' (the seal) or 'invalid-artifact' (format, shapes), naming the field. */
export class ArtifactCheckError extends Error {
  constructor(readonly code: 'artifact-hash-mismatch' | 'invalid-artifact', readonly field: string, message: string) {
    super(message);
    this.name = 'ArtifactCheckError';
  }
}

export interface SealedArtifact {
  artifact: DecoderArtifact;
  /** Canonical JSON including the seal: what is stored and downloaded. */
  artifactText: string;
  sha256: string;
  facts: ArtifactFacts;
}

export function factsOf(a: DecoderArtifact): ArtifactFacts {
  return { recipe: a.recipe, classes: [...a.classes], channelNames: [...a.channelNames], sampleRateHz: a.sampleRateHz,
           epochStartS: a.epoch.tminS, epochEndS: a.epoch.tmaxS };
}

/** Checks a parsed artifact (seal first) and returns it with its canonical text. */
export function readSealedArtifact(value: unknown): SealedArtifact {
  let artifact: DecoderArtifact;
  try {
    artifact = parseArtifact(value);
  } catch (err) {
    if (err instanceof ArtifactIntegrityError) {
      throw new ArtifactCheckError('artifact-hash-mismatch', 'artifact.sha256',
        `The artifact's SHA-256 seal does not match its content (sealed ${err.expected.slice(0, 16)}…, content ${err.actual.slice(0, 16)}…)`);
    }
    if (err instanceof ShapeError || err instanceof ParamError) {
      throw new ArtifactCheckError('invalid-artifact', err.field, `Not a decoder artifact: ${err.message}`);
    }
    throw err;
  }
  return { artifact, artifactText: serialiseArtifact(artifact), sha256: artifact.sha256, facts: factsOf(artifact) };
}

/** Re-verifies stored artifact text against its seal and the stored hash; throws ArtifactCheckError. */
export function verifyArtifactText(text: string, sha256: string): void {
  let value: unknown;
  try { value = JSON.parse(text); } catch { throw new ArtifactCheckError('invalid-artifact', 'artifact', 'The stored artifact is not JSON'); }
  const ok = verifyArtifact(value) && (value as { sha256?: unknown }).sha256 === sha256;
  if (!ok) throw new ArtifactCheckError('artifact-hash-mismatch', 'artifact.sha256', 'The stored artifact does not match its SHA-256 seal');
}

/** The activation-pattern part of a training report's selected component (shared/decoder/recipes/summary.ts). */
interface ReportedProfile { index: number; peakSource?: string; frequencyProfile?: number[]; timeCourse?: number[]; peakFrequencyHz?: number; peakTimeS?: number }

/** The report's activation-pattern profiles by component index (none when absent or malformed). */
function reportedPatterns(report: Record<string, unknown> | null | undefined): Map<number, Required<ReportedProfile>> {
  const out = new Map<number, Required<ReportedProfile>>();
  const list = report?.selectedComponents;
  if (!Array.isArray(list)) return out;
  for (const c of list as ReportedProfile[]) {
    if (c && c.peakSource === 'activation-pattern' && Number.isInteger(c.index) && Array.isArray(c.frequencyProfile) && Array.isArray(c.timeCourse)
      && typeof c.peakFrequencyHz === 'number' && typeof c.peakTimeS === 'number') out.set(c.index, c as Required<ReportedProfile>);
  }
  return out;
}

/**
 * The interpretation in the API's shape (shared/api/decoders.ts), from shared/decoder/interpret.
 * An artifact holds no training data, so its own profiles are the weights'; a training report
 * (REPORT.json, or the in-app training's) carries each selected component's activation pattern
 * (Haufe et al. 2014), which then takes the profiles' place (`profileSource`).
 */
export function interpretArtifact(a: DecoderArtifact, report?: Record<string, unknown> | null): DecoderInterpretation {
  // Every non-zero singular value, so that `rank` is the component's rank.
  const i = interpretDecoder(a, Number.POSITIVE_INFINITY);
  if (i.recipe === 'covariance') {
    return { recipe: 'covariance', covarianceMap: a.model.kind === 'covariance' ? a.model.map ?? 'linear' : 'linear',
      spatialPatterns: i.spatialPatterns.map((p) => ({
        channelNames: p.channelNames, values: p.pattern, eigenvalue: p.eigenvalue, filter: p.filter, favours: p.favours })) };
  }
  const patterns = reportedPatterns(report);
  return { recipe: 'component-tf', components: i.components.map((c) => {
    const p = patterns.get(c.component);
    const ok = p !== undefined && p.frequencyProfile.length === c.frequenciesHz.length && p.timeCourse.length === c.timesS.length;
    return {
      index: c.component,
      plausibility: c.plausibility ?? Number.NaN,
      priorWeight: c.priorWeight,
      weightNorm: c.weightNorm,
      rank: c.singularValues.length,
      scalpMap: { channelNames: c.channelNames, values: c.map },
      weights: { frequenciesHz: c.frequenciesHz, timesS: c.timesS, values: c.weights },
      profileSource: ok ? 'activation-pattern' as const : 'weights' as const,
      frequencyProfile: ok ? p.frequencyProfile : c.weightFrequencyProfile,
      timeCourse: ok ? p.timeCourse : c.weightTimeCourse,
      peakFrequencyHz: ok ? p.peakFrequencyHz : c.weightPeakFrequencyHz,
      peakTimeS: ok ? p.peakTimeS : c.weightPeakTimeS,
    };
  }) };
}
