/**
 * Pilot sessions: one frozen decoder run closed-loop with one participant on one rig, and the
 * trials it produced. Framework-free (zod only): the server checks requests and the client
 * types its answers with the same schemas.
 *
 * Sample indices (`sampleIndex` of trials, cues, events, display frames) count samples of the
 * rig's feed since the bridge's sample 0, the numbering the bridge itself uses; `onsetS` is
 * seconds from the session's start (its first sample).
 */
import { z } from 'zod';
import { idSchema, isoTimestampSchema } from './common';

export const SESSION_STATUSES = ['ready', 'running', 'paused', 'stopped'] as const;
export type SessionStatus = typeof SESSION_STATUSES[number];

/**
 * Why a trial is kept out of accuracy: 'gap' = its epoch overlaps samples the feed never
 * delivered; 'dropout' = its epoch holds non-finite samples or a channel with no variation;
 * 'artifact' = a channel's peak-to-peak amplitude beyond the calibration limit; 'paused' = the
 * cue came while the session was paused.
 */
export const TRIAL_FLAGS = ['gap', 'artifact', 'paused', 'dropout'] as const;
export type TrialFlag = typeof TRIAL_FLAGS[number];

export const SESSION_EVENT_KINDS = ['gap', 'pause', 'resume', 'annotation', 'flag', 'start', 'stop'] as const;
export type SessionEventKind = typeof SESSION_EVENT_KINDS[number];

/** POST /api/sessions body -> 201 SessionSummary. */
export const createSessionRequestSchema = z.strictObject({
  studyId: idSchema,
  participantId: idSchema,
  rigId: idSchema,
  /** Must be a frozen decoder of the same study (409 decoder-not-frozen / decoder-study-mismatch). */
  decoderId: idSchema,
  notes: z.string().trim().max(2000).optional(),
});
export type CreateSessionRequest = z.infer<typeof createSessionRequestSchema>;

/** GET /api/sessions?studyId=N */
export const listSessionsQuerySchema = z.object({
  studyId: z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER).optional(),
});
export type ListSessionsQuery = z.infer<typeof listSessionsQuerySchema>;

/** Running totals of a session. `scored` = trials counted in accuracy (not excluded, true class known). */
export const sessionCountsSchema = z.object({
  trials: z.number().int(),
  scored: z.number().int(),
  correct: z.number().int(),
  /** Trials carrying at least one flag (gap, artifact, paused, dropout). */
  flagged: z.number().int(),
  markedBad: z.number().int(),
  /** Samples announced missing by the feed (GAP frames) while the session ran. */
  droppedSamples: z.number().int(),
  /** Number of missing-sample ranges while the session ran. */
  gaps: z.number().int(),
});
export type SessionCounts = z.infer<typeof sessionCountsSchema>;

/** A session as lists show it. */
export const sessionSummarySchema = z.object({
  id: idSchema,
  studyId: idSchema,
  studyName: z.string(),
  participantId: idSchema,
  participantCode: z.string(),
  rigId: idSchema,
  rigName: z.string(),
  decoderId: idSchema,
  decoderName: z.string(),
  decoderSha256: z.string(),
  status: z.enum(SESSION_STATUSES),
  createdAt: isoTimestampSchema,
  startedAt: isoTimestampSchema.nullable(),
  stoppedAt: isoTimestampSchema.nullable(),
  counts: sessionCountsSchema,
});
export type SessionSummary = z.infer<typeof sessionSummarySchema>;

/**
 * The rig's feed as the server sees it now. When no bridge is connected: connected false and the
 * last known description (or [] / null when none ever connected).
 */
export const feedStateSchema = z.object({
  connected: z.boolean(),
  channelNames: z.array(z.string()),
  /** null when no feed has described itself yet. */
  sampleRateHz: z.number().nullable(),
  /** Samples received in this session so far (since its start; 0 before). */
  samplesReceived: z.number().int(),
  /**
   * How far the newest received sample trails the wall clock, ms: arrival time minus the time
   * the bridge's clock (startTime + index / rate) gives that sample; null without data.
   */
  lagMs: z.number().nullable(),
  /** Last sequence number stored and acknowledged (0 = none). */
  lastSeq: z.number().int(),
});
export type FeedState = z.infer<typeof feedStateSchema>;

/** The decoder's offline (cross-validated) figures, for the gap between online and offline. */
export const offlineFiguresSchema = z.object({
  cvAccuracy: z.number().nullable(),
  wilson95: z.tuple([z.number(), z.number()]).nullable(),
  chanceThreshold95: z.number().nullable(),
});
export type OfflineFigures = z.infer<typeof offlineFiguresSchema>;

/** GET /api/sessions/:sessionId and every state change (start/pause/resume/stop). */
export const sessionDetailSchema = sessionSummarySchema.extend({
  feed: feedStateSchema,
  offline: offlineFiguresSchema,
  classes: z.array(z.string()),
  /** The decoder's epoch window relative to the cue, seconds (end exclusive). */
  epochStartS: z.number(),
  epochEndS: z.number(),
  notes: z.string(),
});
export type SessionDetail = z.infer<typeof sessionDetailSchema>;

/** Milliseconds after the chunk holding the epoch's last sample arrived (cumulative, process.hrtime). */
export const trialLatencySchema = z.object({
  /** Chunk decoded, checked and handed to the engine. */
  receivedMs: z.number(),
  /** Chunk filtered and the epoch assembled. */
  epochMs: z.number(),
  /** Features computed (every decoder stage but the classifier). */
  featuresMs: z.number(),
  /** Class probabilities computed. */
  predictMs: z.number(),
  /** Feedback handed to the display socket(s) and the trial message built for the console. */
  broadcastMs: z.number(),
  totalMs: z.number(),
});
export type TrialLatency = z.infer<typeof trialLatencySchema>;

/** One cue and its epoch's prediction. GET /api/sessions/:sessionId/trials -> Trial[]. */
export const trialSchema = z.object({
  id: idSchema,
  cueId: z.number().int(),
  /** Feed sample index of the cue onset. */
  sampleIndex: z.number().int(),
  /** Cue onset, seconds from the session's start. */
  onsetS: z.number(),
  /** The cue's class when the feed named one of the decoder's classes, else null. */
  trueClass: z.string().nullable(),
  predictedClass: z.string(),
  /** Probability of the predicted class. */
  probability: z.number(),
  /** One per class, in the decoder's class order. */
  probabilities: z.array(z.number()),
  /** null when the true class is unknown. */
  correct: z.boolean().nullable(),
  latency: trialLatencySchema,
  flags: z.array(z.enum(TRIAL_FLAGS)),
  /** Flagged or marked bad: kept out of accuracy. */
  excluded: z.boolean(),
  markedBad: z.boolean(),
  note: z.string().nullable(),
  createdAt: isoTimestampSchema,
});
export type Trial = z.infer<typeof trialSchema>;

/** PATCH /api/sessions/:sessionId/trials/:trialId body (at least one field) -> Trial. */
export const updateTrialRequestSchema = z.strictObject({
  markedBad: z.boolean().optional(),
  note: z.string().trim().max(2000).nullable().optional(),
}).refine((b) => Object.keys(b).length > 0, { message: 'Change at least one field' });
export type UpdateTrialRequest = z.infer<typeof updateTrialRequestSchema>;

/** Something that happened during a session. GET /api/sessions/:sessionId/events -> SessionEvent[]. */
export const sessionEventSchema = z.object({
  id: idSchema,
  at: isoTimestampSchema,
  kind: z.enum(SESSION_EVENT_KINDS),
  text: z.string(),
  /** Feed sample index the event refers to, when it has one. */
  sampleIndex: z.number().int().nullable(),
});
export type SessionEvent = z.infer<typeof sessionEventSchema>;

/** POST /api/sessions/:sessionId/annotations body -> 201 SessionEvent (kind 'annotation'). */
export const createAnnotationRequestSchema = z.strictObject({
  text: z.string().trim().min(1, 'Write the annotation').max(500),
});
export type CreateAnnotationRequest = z.infer<typeof createAnnotationRequestSchema>;

/** POST /api/sessions/:sessionId/display-link -> 201: a one-time, session-bound participant display link. */
export const displayLinkSchema = z.object({
  /** '/display/<token>'; the page opens /ws/display/<token>, which works once. */
  url: z.string(),
  expiresAt: isoTimestampSchema,
});
export type DisplayLink = z.infer<typeof displayLinkSchema>;
