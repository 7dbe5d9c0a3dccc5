/**
 * The gap review of a stopped pilot session: online accuracy (clean trials) against the decoder's
 * nested cross-validated (offline) estimate, the difference with its interval, and findings that
 * each weigh one possible reason for the gap. Framework-free (zod only).
 *
 * GET /api/sessions/:sessionId/review -> GapReview (409 session-not-stopped while it runs).
 * GET /api/sessions/:sessionId/review.pdf -> application/pdf.
 * POST /api/sessions/:sessionId/review/mail -> 201 ReviewMailResult.
 */
import { z } from 'zod';
import { idSchema, isoTimestampSchema } from './common';

/** How far a finding explains the gap, judged only from the stored figures. */
export const FINDING_VERDICTS = ['likely', 'possible', 'unlikely'] as const;
/** 'likely' | 'possible' | 'unlikely'. */
export type FindingVerdict = typeof FINDING_VERDICTS[number];

/**
 * The findings, in the order the review shows them. 'replay' (the live path against an offline
 * re-run of the stored samples) appears when the server could attempt the re-run.
 */
export const FINDING_KEYS = ['chance', 'excluded', 'gaps', 'latency', 'drift', 'overfitting', 'replay'] as const;
/** One of FINDING_KEYS. */
export type FindingKey = typeof FINDING_KEYS[number];

/**
 * How a figure's value reads: 'fraction' in [0, 1] (shown as %), 'difference' a signed fraction
 * (shown as percentage points), 'count', 'seconds', 'ms', 'logit' (natural log-odds), 'p' (a
 * p value), 'text' (value null, `text` holds it).
 */
export const FIGURE_UNITS = ['fraction', 'difference', 'count', 'seconds', 'ms', 'logit', 'p', 'text'] as const;
/** One of FIGURE_UNITS. */
export type FigureUnit = typeof FIGURE_UNITS[number];

/** One number behind a finding; value null = not available (e.g. no labelled trials). */
export const reviewFigureSchema = z.object({
  label: z.string(),
  value: z.number().nullable(),
  unit: z.enum(FIGURE_UNITS),
  /** 95 % interval, when the figure has one. */
  interval: z.tuple([z.number(), z.number()]).optional(),
  text: z.string().optional(),
});
export type ReviewFigure = z.infer<typeof reviewFigureSchema>;

/** One possible reason for the gap, weighed. */
export const reviewFindingSchema = z.object({
  key: z.enum(FINDING_KEYS),
  title: z.string(),
  verdict: z.enum(FINDING_VERDICTS),
  figures: z.array(reviewFigureSchema),
  /** Plain sentences: what the numbers show and what they do not. */
  text: z.string(),
});
export type ReviewFinding = z.infer<typeof reviewFindingSchema>;

/** An accuracy with its Wilson 95 % interval (Wilson 1927). */
export const accuracyEstimateSchema = z.object({
  correct: z.number(),
  trials: z.number().int(),
  accuracy: z.number(),
  wilson95: z.tuple([z.number(), z.number()]),
});
export type AccuracyEstimate = z.infer<typeof accuracyEstimateSchema>;

/** GET /api/sessions/:sessionId/review. */
export const gapReviewSchema = z.object({
  sessionId: idSchema,
  studyId: idSchema,
  studyName: z.string(),
  participantCode: z.string(),
  rigName: z.string(),
  decoderId: idSchema,
  decoderName: z.string(),
  decoderSha256: z.string(),
  classes: z.array(z.string()),
  startedAt: isoTimestampSchema.nullable(),
  stoppedAt: isoTimestampSchema.nullable(),
  generatedAt: isoTimestampSchema,
  /** Clean trials (no flag, not marked bad, true class known); null when there are none. */
  online: accuracyEstimateSchema.nullable(),
  /** Binomial chance threshold for the online trial count (Combrisson & Jerbi 2015), α = 0.05. */
  onlineChance: z.object({
    /** Fewest correct trials that are significant. */
    minCorrect: z.number().int(),
    accuracyNeeded: z.number(),
    aboveChance: z.boolean(),
  }).nullable(),
  /** The decoder's nested cross-validated accuracy over its calibration trials; null when the decoder came without one. */
  offline: accuracyEstimateSchema.nullable(),
  /**
   * Online minus offline with Newcombe's hybrid score 95 % interval (Newcombe 1998, Stat Med
   * 17:873-890, method 10); null when either side is missing.
   */
  difference: z.object({
    value: z.number(),
    newcombe95: z.tuple([z.number(), z.number()]),
  }).nullable(),
  findings: z.array(reviewFindingSchema),
  /** Caution line shown with every review. */
  caution: z.string(),
});
export type GapReview = z.infer<typeof gapReviewSchema>;

/** POST /api/sessions/:sessionId/review/mail -> 201. */
export const reviewMailResultSchema = z.object({
  to: z.string(),
  subject: z.string(),
  messageId: z.string(),
});
export type ReviewMailResult = z.infer<typeof reviewMailResultSchema>;
