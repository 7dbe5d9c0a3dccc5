/**
 * Decoders: imported artifacts (seal verified, protocol checked against the study) and the
 * drafts training jobs make; an investigator freezes one. A decoder's artifact text is written
 * once, at insert, and never rewritten: there is no update path here, freezing re-verifies the
 * seal first, and the database's triggers refuse any change to a frozen row.
 */
import type { DecoderDetail, DecoderInterpretation, DecoderSource, DecoderSummary, ImportDecoderRequest } from '../../shared/api/decoders';
import { normaliseChannelName } from '../../shared/montage';
import type { Db } from '../db/client';
import {
  findDecoder, findDecoderArtifact, findDecoderDetail, freezeDecoder, insertDecoder, listDecoders, type DecoderListRow,
} from '../db/queries/decoders';
import type { Actor, AppContext } from '../context';
import { AppError, notFound } from '../errors';
import { ArtifactCheckError, interpretArtifact, readSealedArtifact, verifyArtifactText } from '../workers/artifact';
import type { ArtifactFacts } from '../workers/protocol';
import { writeAudit } from './audit';
import { getActiveStudy, getStudyOr404 } from './studies';

/** Headline figures kept beside the report for lists. */
interface DecoderMetrics {
  cvAccuracy: number | null;
  wilson95: [number, number] | null;
  chanceThreshold95: number | null;
  trials: number | null;
}

export interface NewDecoder {
  studyId: number;
  name: string;
  source: DecoderSource;
  createdBy: number | null;
  artifactText: string;
  sha256: string;
  facts: ArtifactFacts;
  report: Record<string, unknown> | null;
  /** Headline figures when there is no report (an import without REPORT.json): the artifact's sealed metrics. */
  figures?: Record<string, unknown>;
  interpretation: DecoderInterpretation | null;
  /** Freeze at once (the demo decoder); frozen by the system (no user). */
  freeze?: boolean;
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** The report's headline figures (names as the trainer's REPORT object, issue 4 part 7). */
export function metricsOf(report: Record<string, unknown> | null): DecoderMetrics {
  const w = report?.wilson95;
  const wilson = Array.isArray(w) && w.length === 2 && num(w[0]) !== null && num(w[1]) !== null ? [w[0] as number, w[1] as number] as [number, number] : null;
  const trials = num(report?.trials);
  return {
    cvAccuracy: num(report?.nestedCvAccuracy), wilson95: wilson, chanceThreshold95: num(report?.chanceThreshold95),
    trials: trials !== null && Number.isInteger(trials) ? trials : null,
  };
}

function toSummary(d: DecoderListRow): DecoderSummary {
  const m = d.metrics as Partial<DecoderMetrics>;
  return {
    id: d.id, studyId: d.studyId, name: d.name, recipe: d.recipe, classes: d.classes, channelNames: d.channelNames,
    sampleRateHz: d.sampleRateHz, epochStartS: d.epochStartS, epochEndS: d.epochEndS, sha256: d.sha256, status: d.status,
    cvAccuracy: m.cvAccuracy ?? null, wilson95: m.wilson95 ?? null, chanceThreshold95: m.chanceThreshold95 ?? null,
    trials: m.trials ?? null, createdAt: d.createdAt.toISOString(), createdByName: d.createdByName,
    frozenAt: d.frozenAt?.toISOString() ?? null, frozenByName: d.frozenByName, source: d.source,
  };
}

/**
 * The sealed figures of an artifact (its `metrics` and `training.trials`), in the report's
 * names, for the list columns of an imported decoder.
 */
function sealedFigures(artifact: { metrics: Record<string, unknown>; training: Record<string, unknown> }): Record<string, unknown> {
  return { ...artifact.metrics, trials: artifact.training.trials };
}

/** 400 'report-mismatch' when a report's headline figures differ from the artifact's sealed ones. */
function checkReport(report: Record<string, unknown>, sealed: Record<string, unknown>): void {
  const a = metricsOf(report), b = metricsOf(sealed);
  for (const k of ['cvAccuracy', 'trials'] as const) {
    if (a[k] !== b[k]) {
      const name = k === 'cvAccuracy' ? 'nestedCvAccuracy' : 'trials';
      throw new AppError('report-mismatch', `The report's ${name} (${String(a[k])}) differs from the artifact's sealed figure (${String(b[k])}); `
        + 'is it the report of another training run?', 400, { [`report.${name}`]: `Sealed in the artifact: ${String(b[k])}` });
    }
  }
}

/** Inserts a decoder (draft, or frozen when asked). No audit; callers write it. */
export function insertDecoderFrom(db: Db, d: NewDecoder, now: Date): number {
  return db.transaction(() => {
    const id = insertDecoder(db, {
      studyId: d.studyId, name: d.name, recipe: d.facts.recipe, classes: d.facts.classes,
      channelNames: d.facts.channelNames.map(normaliseChannelName), sampleRateHz: d.facts.sampleRateHz,
      epochStartS: d.facts.epochStartS, epochEndS: d.facts.epochEndS, artifact: d.artifactText, sha256: d.sha256,
      metrics: { ...metricsOf(d.report ?? d.figures ?? null) }, report: d.report, interpretation: d.interpretation as Record<string, unknown> | null,
      source: d.source, createdBy: d.createdBy,
    }, now);
    if (d.freeze) freezeDecoder(db, id, null, now);
    return id;
  });
}

/** What differs between an artifact and the study, per field; empty when they agree. */
export function studyMismatch(facts: ArtifactFacts, study: { cueClasses: string[]; channelNames: string[]; sampleRateHz: number }): Record<string, string> {
  const out: Record<string, string> = {};
  if (facts.classes.length !== study.cueClasses.length || facts.classes.some((c, i) => c !== study.cueClasses[i])) {
    out.classes = `The decoder's classes [${facts.classes.join(', ')}] differ from the study's [${study.cueClasses.join(', ')}]`;
  }
  const montage = new Set(study.channelNames.map(normaliseChannelName));
  const missing = facts.channelNames.map(normaliseChannelName).filter((c) => !montage.has(c));
  if (missing.length > 0) out.channelNames = `The decoder reads channels the study montage lacks: ${missing.join(', ')}`;
  if (Math.abs(facts.sampleRateHz - study.sampleRateHz) > 1e-9) {
    out.sampleRateHz = `The decoder expects ${facts.sampleRateHz} Hz, the study records at ${study.sampleRateHz} Hz`;
  }
  return out;
}

function sealError(err: unknown): AppError | null {
  if (!(err instanceof ArtifactCheckError)) return null;
  return new AppError(err.code, err.message, 400, { [err.field]: err.message });
}

export function decoderService(ctx: AppContext) {
  const { db } = ctx;

  function getOr404(decoderId: number): DecoderListRow {
    const d = findDecoder(db, decoderId);
    if (!d) throw notFound('Decoder');
    return d;
  }

  return {
    list(studyId: number): DecoderSummary[] {
      getStudyOr404(db, studyId);
      return listDecoders(db, studyId).map(toSummary);
    },

    get(decoderId: number): DecoderDetail {
      const d = findDecoderDetail(db, decoderId);
      if (!d) throw notFound('Decoder');
      return { ...toSummary(d), report: d.report, interpretation: d.interpretation as DecoderInterpretation | null };
    },

    /** Verifies the seal (400), checks classes/channels/rate against the study (409), stores a draft. */
    import(studyId: number, input: ImportDecoderRequest, actor: Actor): DecoderSummary {
      const study = getActiveStudy(db, studyId);
      let sealed: ReturnType<typeof readSealedArtifact>;
      try { sealed = readSealedArtifact(input.artifact); } catch (err) { throw sealError(err) ?? err; }
      const figures = sealedFigures(sealed.artifact);
      if (input.report) checkReport(input.report, figures);
      const differs = studyMismatch(sealed.facts, study);
      if (Object.keys(differs).length > 0) {
        throw new AppError('decoder-study-mismatch', `The decoder does not fit the study: ${Object.values(differs).join('; ')}`, 409, differs);
      }
      const now = ctx.now();
      const id = db.transaction(() => {
        const newId = insertDecoderFrom(db, {
          studyId, name: input.name, source: 'import', createdBy: actor.id, artifactText: sealed.artifactText,
          sha256: sealed.sha256, facts: sealed.facts, report: input.report ?? null, figures,
          interpretation: interpretArtifact(sealed.artifact, input.report ?? null),
        }, now);
        writeAudit(db, actor, { action: 'decoder.import', targetType: 'decoder', targetId: newId,
          details: { studyId, name: input.name, sha256: sealed.sha256 } }, now);
        return newId;
      });
      return toSummary(getOr404(id));
    },

    /** Freezes a draft after re-verifying its stored seal; 409 'decoder-frozen' when already frozen. */
    freeze(decoderId: number, actor: Actor): DecoderSummary {
      const now = ctx.now();
      db.transaction(() => {
        const stored = findDecoderArtifact(db, decoderId);
        if (!stored) throw notFound('Decoder');
        if (stored.status === 'frozen') throw new AppError('decoder-frozen', 'This decoder is already frozen', 409);
        getActiveStudy(db, getOr404(decoderId).studyId);
        try { verifyArtifactText(stored.artifact, stored.sha256); } catch (err) { throw sealError(err) ?? err; }
        if (!freezeDecoder(db, decoderId, actor.id, now)) throw new AppError('decoder-frozen', 'This decoder is already frozen', 409);
        writeAudit(db, actor, { action: 'decoder.freeze', targetType: 'decoder', targetId: decoderId, details: { sha256: stored.sha256 } }, now);
      });
      return toSummary(getOr404(decoderId));
    },

    /** The artifact text exactly as sealed, with its seal and a file name for the download. */
    artifact(decoderId: number): { text: string; sha256: string; fileName: string } {
      const stored = findDecoderArtifact(db, decoderId);
      if (!stored) throw notFound('Decoder');
      const slug = stored.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'decoder';
      return { text: stored.artifact, sha256: stored.sha256, fileName: `${slug}-${stored.id}-${stored.sha256.slice(0, 8)}.json` };
    },
  };
}
export type DecoderService = ReturnType<typeof decoderService>;
