/**
 * Decoders: trained pipelines sealed by the SHA-256 of their artifact. A decoder starts as a
 * draft (imported, or made by a training job); an investigator freezes it, after which its
 * artifact never changes and it may run in pilot sessions.
 *
 * GET /api/decoders?studyId=N -> DecoderSummary[]
 * POST /api/studies/:studyId/decoders {name, artifact, report?} -> 201 DecoderSummary
 *   (400 'artifact-hash-mismatch' | 'invalid-artifact'; 409 'decoder-study-mismatch' | 'study-archived')
 * GET /api/decoders/:decoderId -> DecoderDetail
 * POST /api/decoders/:decoderId/freeze -> DecoderSummary (409 'decoder-frozen' when already frozen)
 * GET /api/decoders/:decoderId/artifact -> the artifact JSON, byte for byte as sealed
 */
import { z } from 'zod';
import { idParamSchema, idSchema, isoTimestampSchema } from './common';
import { RECIPES } from './studies';

export const DECODER_STATUSES = ['draft', 'frozen'] as const;
export type DecoderStatus = typeof DECODER_STATUSES[number];

/** 'import': uploaded artifact; 'training-job': made by a training job; 'demo': the seeded demo decoder. */
export const DECODER_SOURCES = ['import', 'training-job', 'demo'] as const;
export type DecoderSource = typeof DECODER_SOURCES[number];

/** Largest import body the server accepts (the import route's own limit), bytes. */
export const DECODER_IMPORT_LIMIT_BYTES = 20 * 1024 * 1024;

/** GET /api/decoders?studyId=N */
export const decoderListQuerySchema = z.object({
  studyId: idParamSchema,
});
export type DecoderListQuery = z.infer<typeof decoderListQuerySchema>;

/**
 * POST /api/studies/:studyId/decoders body. `artifact` is the decoder artifact JSON as written by
 * `aftercue train --out`; `report` optionally the REPORT.json written beside it (its headline
 * figures then show in lists). The seal is verified on the server.
 */
export const importDecoderRequestSchema = z.strictObject({
  name: z.string().trim().min(1, 'Give the decoder a name').max(120, 'Use at most 120 characters'),
  artifact: z.record(z.string(), z.unknown(), { message: 'Give the artifact JSON object' }),
  report: z.record(z.string(), z.unknown()).optional(),
});
export type ImportDecoderRequest = z.infer<typeof importDecoderRequestSchema>;

/** A decoder in lists. Accuracy figures are null when no training report is known. */
export const decoderSummarySchema = z.object({
  id: idSchema,
  studyId: idSchema,
  name: z.string(),
  recipe: z.enum(RECIPES),
  /** Class labels in the decoder's output order (the study's cue classes). */
  classes: z.array(z.string()),
  /** Channels the decoder reads, in its order, canonical 10-10 spelling. */
  channelNames: z.array(z.string()),
  sampleRateHz: z.number(),
  /** Epoch window relative to the cue, seconds. */
  epochStartS: z.number(),
  epochEndS: z.number(),
  /** Hex SHA-256 seal of the artifact. */
  sha256: z.string(),
  status: z.enum(DECODER_STATUSES),
  /** Nested cross-validated accuracy, 0..1. */
  cvAccuracy: z.number().nullable(),
  /** Wilson 95 % interval of cvAccuracy. */
  wilson95: z.tuple([z.number(), z.number()]).nullable(),
  /** Binomial 95 % chance threshold for `trials` trials, 0..1. */
  chanceThreshold95: z.number().nullable(),
  /** Number of training trials. */
  trials: z.number().int().nullable(),
  createdAt: isoTimestampSchema,
  createdByName: z.string().nullable(),
  frozenAt: isoTimestampSchema.nullable(),
  frozenByName: z.string().nullable(),
  source: z.enum(DECODER_SOURCES),
});
export type DecoderSummary = z.infer<typeof decoderSummarySchema>;

/** A scalp map: one value per channel (a mixing column or spatial pattern, arbitrary units). */
export const scalpMapSchema = z.object({
  channelNames: z.array(z.string()),
  values: z.array(z.number()),
});
export type ScalpMap = z.infer<typeof scalpMapSchema>;

/** One selected component of a component-tf decoder, for display. */
export const componentInterpretationSchema = z.object({
  index: z.number().int(),
  /** Cortical plausibility score in [0, 1] (1 = looks cortical). */
  plausibility: z.number(),
  /** Prior weight w_k of the component's block in the trace-norm penalty. */
  priorWeight: z.number(),
  /** Frobenius norm of the component's F x T weight matrix. */
  weightNorm: z.number(),
  rank: z.number().int(),
  scalpMap: scalpMapSchema,
  weights: z.object({
    frequenciesHz: z.array(z.number()),
    timesS: z.array(z.number()),
    values: z.array(z.array(z.number())), // [frequency][time]
  }),
  /**
   * Where frequencyProfile, timeCourse and the peaks come from: 'activation-pattern' (how the
   * component's power moves with the decision on the training epochs, Haufe et al. 2014; only
   * when the decoder was trained here or imported with its report) or 'weights' (the weight
   * matrix's leading singular vectors: a filter, which may peak away from the effect).
   */
  profileSource: z.enum(['activation-pattern', 'weights']).default('weights'),
  /** Leading left singular vector (over frequenciesHz) of the profile source. */
  frequencyProfile: z.array(z.number()),
  /** Leading right singular vector (over timesS) of the profile source. */
  timeCourse: z.array(z.number()),
  peakFrequencyHz: z.number(),
  peakTimeS: z.number(),
});
export type ComponentInterpretation = z.infer<typeof componentInterpretationSchema>;

/** One discriminative spatial pattern of a covariance decoder. */
export const spatialPatternSchema = z.object({
  channelNames: z.array(z.string()),
  /** The pattern (Haufe et al. 2014): how the source shows on the scalp. */
  values: z.array(z.number()),
  /** Eigenvalue of the symmetric weight: > 0 means more power along the filter favours classes[1]. */
  eigenvalue: z.number(),
  /** The spatial filter the decoder applies (not for reading as a map). */
  filter: z.array(z.number()).optional(),
  /** The class more power along this direction favours. */
  favours: z.string().optional(),
});
export type SpatialPattern = z.infer<typeof spatialPatternSchema>;

/** What the decoder detail page draws. */
export const decoderInterpretationSchema = z.object({
  recipe: z.enum(RECIPES),
  components: z.array(componentInterpretationSchema).optional(),
  spatialPatterns: z.array(spatialPatternSchema).optional(),
  /** Covariance decoders: the feature map ('log': tangent space; absent in older interpretations: 'linear'). */
  covarianceMap: z.enum(['linear', 'log']).optional(),
});
export type DecoderInterpretation = z.infer<typeof decoderInterpretationSchema>;

/**
 * GET /api/decoders/:decoderId. `report` is the training report (nestedCvAccuracy, wilson95,
 * foldAccuracies, baselines, ... as written by the trainer), null when an import came without
 * one; `interpretation` is derived from the artifact, null when it cannot be.
 */
export const decoderDetailSchema = decoderSummarySchema.extend({
  report: z.record(z.string(), z.unknown()).nullable(),
  interpretation: decoderInterpretationSchema.nullable(),
});
export type DecoderDetail = z.infer<typeof decoderDetailSchema>;
