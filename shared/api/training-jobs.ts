/**
 * Training jobs: offline fit + nested cross-validation of a study's recipe on stored
 * recordings, run one at a time in a worker thread; a finished job leaves a draft decoder.
 *
 * POST /api/studies/:studyId/training-jobs CreateTrainingJobRequest -> 201 TrainingJob
 *   (400 'validation', e.g. more folds than cues of a class; 409 'study-archived' |
 *   'recording-mismatch' naming what differs | 'unsupported-classes' when the study does not have
 *   exactly two cue classes: decoders are binary)
 * GET /api/training-jobs?studyId=N -> TrainingJob[] (newest first)
 * GET /api/training-jobs/:jobId -> TrainingJob (poll it: progress and stage move while it runs)
 */
import { COVARIANCE_MAPS, type CovarianceMap } from '../decoder/recipes/covariance-map';
import { z } from 'zod';
import { idParamSchema, idSchema, isoTimestampSchema } from './common';
import { RECIPES } from './studies';

export const TRAINING_JOB_STATUSES = ['queued', 'running', 'done', 'failed'] as const;
export type TrainingJobStatus = typeof TRAINING_JOB_STATUSES[number];

/** Limits of the request's numbers. */
export const TRAINING_LIMITS = {
  recordingsMax: 50,
  foldsMin: 2,
  foldsMax: 20,
  innerMin: 2,
  innerMax: 10,
  componentsMax: 128,
} as const;

const annotationText = z.string().trim().min(1).max(64);

export const createTrainingJobRequestSchema = z.strictObject({
  recordingIds: z.array(idSchema).min(1, 'Pick at least one recording').max(TRAINING_LIMITS.recordingsMax)
    .refine((ids) => new Set(ids).size === ids.length, 'Pick each recording once'),
  name: z.string().trim().min(1, 'Give the decoder a name').max(120, 'Use at most 120 characters'),
  /** Default: the study's recipe. */
  recipe: z.enum(RECIPES).optional(),
  /**
   * Annotation texts of the recordings, one per study cue class in the study's order (e.g.
   * ['T1', 'T2'] for ['left-hand', 'right-hand']). Default: the study's class labels themselves.
   */
  classes: z.array(annotationText).min(2).max(8)
    .refine((c) => new Set(c).size === c.length, 'Give each annotation text once').optional(),
  /** Outer folds of the nested cross-validation (default 10). */
  folds: z.number().int().min(TRAINING_LIMITS.foldsMin).max(TRAINING_LIMITS.foldsMax).optional(),
  /** Inner folds for lambda (default 5). */
  inner: z.number().int().min(TRAINING_LIMITS.innerMin).max(TRAINING_LIMITS.innerMax).optional(),
  seed: z.number().int().min(0).max(2 ** 32 - 1).optional(),
  /** ICA components kept (component-tf recipe). */
  components: z.number().int().min(1).max(TRAINING_LIMITS.componentsMax).optional(),
  /** Cortical plausibility prior on (default) or off (component-tf recipe). */
  prior: z.boolean().optional(),
  /** Covariance recipe's feature map: 'log' (tangent space) or 'linear' (default: the recipe's). */
  covarianceMap: z.enum(COVARIANCE_MAPS as [CovarianceMap, ...CovarianceMap[]]).optional(),
});
export type CreateTrainingJobRequest = z.infer<typeof createTrainingJobRequestSchema>;

/** GET /api/training-jobs?studyId=N */
export const trainingJobListQuerySchema = z.object({
  studyId: idParamSchema,
});
export type TrainingJobListQuery = z.infer<typeof trainingJobListQuerySchema>;

export const trainingJobSchema = z.object({
  id: idSchema,
  studyId: idSchema,
  name: z.string(),
  status: z.enum(TRAINING_JOB_STATUSES),
  /** 0..1 */
  progress: z.number(),
  /** What the job is doing, in words ('queued', 'reading recordings', 'outer fold 3/10', ...). */
  stage: z.string(),
  /** The draft decoder the job made, once done. */
  decoderId: idSchema.nullable(),
  error: z.string().nullable(),
  createdAt: isoTimestampSchema,
  finishedAt: isoTimestampSchema.nullable(),
});
export type TrainingJob = z.infer<typeof trainingJobSchema>;
