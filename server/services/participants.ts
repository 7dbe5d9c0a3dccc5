/**
 * Participants of a study: pseudonymous codes (unique per study, case-insensitive) with their
 * consent status. No name is ever stored; the API refuses unknown fields such as `name`.
 */
import {
  participantFieldsSchema, zodFieldErrors,
  type CreateParticipantRequest, type Participant, type UpdateParticipantRequest,
} from '../../shared/api';
import type { Db } from '../db/client';
import { codeTaken, findParticipant, insertParticipant, listParticipants, updateParticipant, type ParticipantValues } from '../db/queries/participants';
import type { ParticipantRow } from '../db/schema';
import type { Actor, AppContext } from '../context';
import { AppError, notFound, validationError } from '../errors';
import { writeAudit } from './audit';
import { getActiveStudy, getStudyOr404 } from './studies';

export function toParticipant(p: ParticipantRow): Participant {
  return {
    id: p.id, studyId: p.studyId, code: p.code, consentStatus: p.consentStatus, consentDate: p.consentDate,
    notes: p.notes, createdAt: p.createdAt.toISOString(), updatedAt: p.updatedAt.toISOString(),
  };
}

function duplicateCode(): AppError {
  return new AppError('duplicate-code', 'Another participant of this study has this code', 409, { code: 'Already in use in this study' });
}

function values(input: CreateParticipantRequest): ParticipantValues {
  return { code: input.code, consentStatus: input.consentStatus, consentDate: input.consentDate ?? null, notes: input.notes ?? '' };
}

/** Inserts a participant after the duplicate check (no audit; callers write it). */
export function insertParticipantFrom(db: Db, studyId: number, input: CreateParticipantRequest, now: Date): ParticipantRow {
  if (codeTaken(db, studyId, input.code)) throw duplicateCode();
  return insertParticipant(db, studyId, values(input), now);
}

export function participantService(ctx: AppContext) {
  const { db } = ctx;
  return {
    list(studyId: number): Participant[] {
      getStudyOr404(db, studyId);
      return listParticipants(db, studyId).map(toParticipant);
    },

    create(studyId: number, input: CreateParticipantRequest, actor: Actor): Participant {
      const now = ctx.now();
      return db.transaction(() => {
        getActiveStudy(db, studyId);
        const row = insertParticipantFrom(db, studyId, input, now);
        writeAudit(db, actor, { action: 'participant.create', targetType: 'participant', targetId: row.id,
          details: { studyId, code: row.code, consentStatus: row.consentStatus } }, now);
        return toParticipant(row);
      });
    },

    /** Applies a partial change; the merged participant must still pass every rule (a date when consent is given). */
    update(studyId: number, participantId: number, patch: UpdateParticipantRequest, actor: Actor): Participant {
      const now = ctx.now();
      return db.transaction(() => {
        getActiveStudy(db, studyId);
        const current = findParticipant(db, studyId, participantId);
        if (!current) throw notFound('Participant');
        const merged = participantFieldsSchema.safeParse({ ...values(current), ...patch });
        if (!merged.success) throw validationError(zodFieldErrors(merged.error));
        if (patch.code !== undefined && codeTaken(db, studyId, patch.code, participantId)) throw duplicateCode();
        const next = values(merged.data);
        const changed = Object.keys(patch) as (keyof ParticipantValues)[];
        const row = updateParticipant(db, participantId, Object.fromEntries(changed.map((k) => [k, next[k]])), now)!;
        writeAudit(db, actor, { action: 'participant.update', targetType: 'participant', targetId: participantId,
          details: { studyId, changed, consentStatus: row.consentStatus } }, now);
        return toParticipant(row);
      });
    },
  };
}
export type ParticipantService = ReturnType<typeof participantService>;
