/**
 * Studies: created and edited by investigators (and admins), read by everyone, archived to
 * become read-only. Channel names are stored in canonical 10-10 spelling.
 */
import {
  studyFieldsSchema, zodFieldErrors,
  type CreateStudyRequest, type Study, type StudyListQuery, type UpdateStudyRequest,
} from '../../shared/api';
import { normaliseChannelName } from '../../shared/montage';
import type { Db } from '../db/client';
import { archiveStudy, findStudy, insertStudy, listStudies, updateStudy, type StudyValues, type StudyWithCreator } from '../db/queries/studies';
import type { Actor, AppContext } from '../context';
import { AppError, notFound, validationError } from '../errors';
import { writeAudit } from './audit';

export function toStudy(s: StudyWithCreator): Study {
  return {
    id: s.id, name: s.name, description: s.description, ethicsReference: s.ethicsReference,
    cueClasses: s.cueClasses, epochStartS: s.epochStartS, epochEndS: s.epochEndS, channelNames: s.channelNames,
    sampleRateHz: s.sampleRateHz, powerLineHz: s.powerLineHz, recipe: s.recipe, status: s.status,
    createdAt: s.createdAt.toISOString(), createdBy: s.createdBy, createdByName: s.createdByName,
    updatedAt: s.updatedAt.toISOString(),
  };
}

function values(input: CreateStudyRequest): StudyValues {
  return {
    name: input.name, description: input.description ?? '', ethicsReference: input.ethicsReference,
    cueClasses: input.cueClasses, epochStartS: input.epochStartS, epochEndS: input.epochEndS,
    channelNames: input.channelNames.map(normaliseChannelName), sampleRateHz: input.sampleRateHz,
    powerLineHz: input.powerLineHz, recipe: input.recipe,
  };
}

/** The study, or 404. */
export function getStudyOr404(db: Db, studyId: number): StudyWithCreator {
  const s = findStudy(db, studyId);
  if (!s) throw notFound('Study');
  return s;
}

/** The study if it exists and is active; 404 or 409 'study-archived' otherwise. */
export function getActiveStudy(db: Db, studyId: number): StudyWithCreator {
  const s = getStudyOr404(db, studyId);
  if (s.status === 'archived') throw new AppError('study-archived', 'Archived studies are read-only', 409);
  return s;
}

/** Inserts a study (no audit; callers write it). */
export function insertStudyFrom(db: Db, input: CreateStudyRequest, createdBy: number, now: Date): number {
  return insertStudy(db, values(input), createdBy, now);
}

export function studyService(ctx: AppContext) {
  const { db } = ctx;
  return {
    list(q: StudyListQuery): Study[] {
      return listStudies(db, q.includeArchived ?? false).map(toStudy);
    },

    get(studyId: number): Study {
      return toStudy(getStudyOr404(db, studyId));
    },

    create(input: CreateStudyRequest, actor: Actor): Study {
      const now = ctx.now();
      return db.transaction(() => {
        const id = insertStudyFrom(db, input, actor.id, now);
        writeAudit(db, actor, { action: 'study.create', targetType: 'study', targetId: id, details: { name: input.name } }, now);
        return toStudy(findStudy(db, id)!);
      });
    },

    /** Applies a partial change; the merged study must still pass every rule (e.g. epoch end after start). */
    update(studyId: number, patch: UpdateStudyRequest, actor: Actor): Study {
      const now = ctx.now();
      return db.transaction(() => {
        const current = getActiveStudy(db, studyId);
        const merged = studyFieldsSchema.safeParse({ ...editable(current), ...patch });
        if (!merged.success) throw validationError(zodFieldErrors(merged.error));
        const next = values(merged.data);
        const changed = (Object.keys(patch) as (keyof StudyValues)[]);
        updateStudy(db, studyId, Object.fromEntries(changed.map((k) => [k, next[k]])), now);
        writeAudit(db, actor, { action: 'study.update', targetType: 'study', targetId: studyId, details: { changed } }, now);
        return toStudy(findStudy(db, studyId)!);
      });
    },

    archive(studyId: number, actor: Actor): Study {
      const now = ctx.now();
      return db.transaction(() => {
        getActiveStudy(db, studyId);
        archiveStudy(db, studyId, now);
        writeAudit(db, actor, { action: 'study.archive', targetType: 'study', targetId: studyId }, now);
        return toStudy(findStudy(db, studyId)!);
      });
    },
  };
}
export type StudyService = ReturnType<typeof studyService>;

function editable(s: StudyWithCreator): CreateStudyRequest {
  return {
    name: s.name, description: s.description, ethicsReference: s.ethicsReference, cueClasses: s.cueClasses,
    epochStartS: s.epochStartS, epochEndS: s.epochEndS, channelNames: s.channelNames, sampleRateHz: s.sampleRateHz,
    powerLineHz: s.powerLineHz, recipe: s.recipe,
  };
}
