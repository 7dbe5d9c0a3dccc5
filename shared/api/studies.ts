/**
 * Studies: a protocol with its cue classes, epoch window, montage, sampling rate and ethics
 * reference. An archived study is read-only (409 study-archived on any change).
 */
import { z } from 'zod';
import { booleanQuerySchema, idSchema, isoTimestampSchema } from './common';

/** Trade-off recipes of the decoder engine (DESIGN.md, "The decoder" 3-5). */
export const RECIPES = ['component-tf', 'covariance'] as const;
export type Recipe = typeof RECIPES[number];

export const STUDY_STATUSES = ['active', 'archived'] as const;
export type StudyStatus = typeof STUDY_STATUSES[number];

/**
 * A 10-10 style electrode name: a row prefix (Fp AF F FT FC T TP C CP P PO O I, plus N, A, M for
 * nasion/inion and reference sites) and `z` (midline) or a position number 1..10, as in C3, FCz,
 * Fp1, T10. Case-insensitive; the name is kept as written.
 */
export const CHANNEL_NAME_PATTERN = /^(Fp|AF|FT|FC|TP|CP|PO|F|T|C|P|O|I|N|A|M)(z|[1-9]|10)$/i;

/** A cue class label: a letter or digit, then up to 31 letters, digits, '-' or '_' (e.g. `left-hand`). */
export const CUE_CLASS_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_-]{0,31}$/;

/** Limits of a study's numeric fields: seconds relative to the cue, hertz. */
export const STUDY_LIMITS = {
  epochStartMinS: -2,
  epochEndMaxS: 10,
  sampleRateMinHz: 50,
  sampleRateMaxHz: 10000,
  cueClassesMin: 2,
  cueClassesMax: 8,
  channelsMin: 1,
  channelsMax: 256,
} as const;

function uniqueCaseInsensitive(values: string[]): boolean {
  return new Set(values.map((v) => v.toLowerCase())).size === values.length;
}

/** The editable fields of a study, without the cross-field rule (use studyFieldsSchema to check a whole study). */
export const studyFieldsObject = z.strictObject({
  name: z.string().trim().min(3, 'Use at least 3 characters').max(120, 'Use at most 120 characters'),
  /** Free text; '' when left out. */
  description: z.string().trim().max(4000).optional(),
  /** The ethics approval reference, e.g. 'IRB-2026-0142'. Required: sessions need approval. */
  ethicsReference: z.string().trim().min(1, 'Enter the ethics approval reference').max(120),
  cueClasses: z.array(z.string().trim().regex(CUE_CLASS_PATTERN, 'Use letters, digits, - or _ (up to 32)'))
    .min(STUDY_LIMITS.cueClassesMin, 'Give at least 2 cue classes')
    .max(STUDY_LIMITS.cueClassesMax, 'Give at most 8 cue classes')
    .refine(uniqueCaseInsensitive, 'Cue classes must be unique'),
  /** Epoch window start, seconds relative to the cue (may be negative: a pre-cue baseline). */
  epochStartS: z.number().finite().min(STUDY_LIMITS.epochStartMinS, 'Start at -2 s or later'),
  /** Epoch window end, seconds relative to the cue; after the start, at most 10 s. */
  epochEndS: z.number().finite().max(STUDY_LIMITS.epochEndMaxS, 'End at 10 s or earlier'),
  channelNames: z.array(z.string().trim().regex(CHANNEL_NAME_PATTERN, 'Use a 10-10 name such as C3, FCz or Fp1'))
    .min(STUDY_LIMITS.channelsMin, 'Give at least one channel')
    .max(STUDY_LIMITS.channelsMax, 'Give at most 256 channels')
    .refine(uniqueCaseInsensitive, 'Channel names must be unique'),
  sampleRateHz: z.number().finite()
    .min(STUDY_LIMITS.sampleRateMinHz, 'Use at least 50 Hz').max(STUDY_LIMITS.sampleRateMaxHz, 'Use at most 10000 Hz'),
  /** Mains frequency at the lab (for the notch filter). */
  powerLineHz: z.union([z.literal(50), z.literal(60)], { message: 'Use 50 or 60 Hz' }),
  recipe: z.enum(RECIPES),
});

function epochWindowRule(v: { epochStartS?: number; epochEndS?: number }, ctx: z.RefinementCtx): void {
  if (v.epochStartS !== undefined && v.epochEndS !== undefined && !(v.epochEndS > v.epochStartS)) {
    ctx.addIssue({ code: 'custom', path: ['epochEndS'], message: 'End the epoch after its start' });
  }
}

/** A complete set of study fields with the epoch-window rule; POST /api/studies body. */
export const createStudyRequestSchema = studyFieldsObject.superRefine(epochWindowRule);
export type CreateStudyRequest = z.infer<typeof createStudyRequestSchema>;
/** Same as createStudyRequestSchema; the server re-checks a patched study with it. */
export const studyFieldsSchema = createStudyRequestSchema;

/** PATCH /api/studies/:studyId body: any subset (at least one field); the merged study must pass studyFieldsSchema. */
export const updateStudyRequestSchema = studyFieldsObject.partial()
  .superRefine(epochWindowRule)
  .refine((b) => Object.keys(b).length > 0, { message: 'Change at least one field' });
export type UpdateStudyRequest = z.infer<typeof updateStudyRequestSchema>;

/** GET /api/studies?includeArchived=true — archived studies are left out unless asked for. */
export const studyListQuerySchema = z.object({
  includeArchived: booleanQuerySchema.optional(),
});
export type StudyListQuery = z.infer<typeof studyListQuerySchema>;

/**
 * A study as the API returns it. GET /api/studies -> Study[]; POST -> 201 Study;
 * GET/PATCH /api/studies/:studyId -> Study; POST /api/studies/:studyId/archive -> Study.
 */
export const studySchema = z.object({
  id: idSchema,
  name: z.string(),
  description: z.string(),
  ethicsReference: z.string(),
  cueClasses: z.array(z.string()),
  epochStartS: z.number(),
  epochEndS: z.number(),
  channelNames: z.array(z.string()),
  sampleRateHz: z.number(),
  powerLineHz: z.union([z.literal(50), z.literal(60)]),
  recipe: z.enum(RECIPES),
  status: z.enum(STUDY_STATUSES),
  createdAt: isoTimestampSchema,
  /** Id of the user who created the study. */
  createdBy: idSchema,
  /** Display name of that user, for lists. */
  createdByName: z.string(),
  updatedAt: isoTimestampSchema,
});
export type Study = z.infer<typeof studySchema>;
