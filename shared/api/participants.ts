/**
 * Participants: pseudonymous codes within a study, with their consent status. There is no
 * name field, by design: a participant is never identified in Aftercue, and a code must not
 * be derived from a name. Requests with any field not listed here (e.g. `name`) are refused.
 */
import { z } from 'zod';
import { idSchema, isoDateSchema, isoTimestampSchema } from './common';

/** A pseudonymous code: 2..32 characters, a letter or digit first, then letters, digits, '_' or '-'. */
export const PARTICIPANT_CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_-]{1,31}$/;

export const CONSENT_STATUSES = ['pending', 'given', 'withdrawn'] as const;
export type ConsentStatus = typeof CONSENT_STATUSES[number];

const participantObject = z.strictObject({
  /** Unique within its study (409 duplicate-code). */
  code: z.string().trim().regex(PARTICIPANT_CODE_PATTERN, 'Use 2-32 letters, digits, - or _ (a pseudonymous code, never a name)'),
  consentStatus: z.enum(CONSENT_STATUSES),
  /** Date consent was recorded, YYYY-MM-DD; required when consent is given. */
  consentDate: isoDateSchema.nullable().optional(),
  /** Free notes; must not identify the participant. */
  notes: z.string().trim().max(2000).optional(),
});

function consentDateRule(v: { consentStatus?: ConsentStatus; consentDate?: string | null }, ctx: z.RefinementCtx): void {
  if (v.consentStatus === 'given' && !v.consentDate) {
    ctx.addIssue({ code: 'custom', path: ['consentDate'], message: 'Give the date consent was given' });
  }
}

/** POST /api/studies/:studyId/participants body -> 201 Participant. */
export const createParticipantRequestSchema = participantObject.superRefine(consentDateRule);
export type CreateParticipantRequest = z.infer<typeof createParticipantRequestSchema>;
/** The rules a whole participant obeys; the server re-checks a patched participant with it. */
export const participantFieldsSchema = createParticipantRequestSchema;

/** PATCH /api/studies/:studyId/participants/:participantId body (at least one field) -> Participant. */
export const updateParticipantRequestSchema = participantObject.partial()
  .superRefine(consentDateRule)
  .refine((b) => Object.keys(b).length > 0, { message: 'Change at least one field' });
export type UpdateParticipantRequest = z.infer<typeof updateParticipantRequestSchema>;

/** A participant as the API returns it. GET /api/studies/:studyId/participants -> Participant[]. */
export const participantSchema = z.object({
  id: idSchema,
  studyId: idSchema,
  code: z.string(),
  consentStatus: z.enum(CONSENT_STATUSES),
  consentDate: z.string().nullable(),
  notes: z.string(),
  createdAt: isoTimestampSchema,
  updatedAt: isoTimestampSchema,
});
export type Participant = z.infer<typeof participantSchema>;
