/**
 * Recordings: stored continuous EEG with cue markers, uploaded as EDF/EDF+/BDF, captured from a
 * pilot session's feed, or simulated for the demo.
 *
 * POST /api/studies/:studyId/recordings?name=...[&participantId=N], body the raw file
 *   (Content-Type application/octet-stream, at most RECORDING_UPLOAD_LIMIT_BYTES)
 *   -> 201 RecordingSummary; 400 'invalid-edf' with `fields` naming the file field at fault.
 * GET /api/studies/:studyId/recordings -> RecordingSummary[] (newest first)
 */
import { z } from 'zod';
import { idParamSchema, idSchema, isoTimestampSchema } from './common';

/** Largest upload the server accepts, bytes. */
export const RECORDING_UPLOAD_LIMIT_BYTES = 200 * 1024 * 1024;

export const RECORDING_SOURCES = ['upload', 'session', 'simulated'] as const;
export type RecordingSource = typeof RECORDING_SOURCES[number];

/** Query of the upload route: a display name (e.g. the file name) and optionally the participant. */
export const uploadRecordingQuerySchema = z.object({
  name: z.string().trim().min(1, 'Give the recording a name').max(200, 'Use at most 200 characters'),
  participantId: idParamSchema.optional(),
});
export type UploadRecordingQuery = z.infer<typeof uploadRecordingQuerySchema>;

export const recordingSummarySchema = z.object({
  id: idSchema,
  studyId: idSchema,
  participantId: idSchema.nullable(),
  name: z.string(),
  source: z.enum(RECORDING_SOURCES),
  /** Channel labels as stored (canonical 10-10 spelling where the label is a 10-10 name). */
  channelNames: z.array(z.string()),
  sampleRateHz: z.number(),
  durationS: z.number(),
  /** Annotation text -> number of annotations with that text (cue markers). */
  cueCounts: z.record(z.string(), z.number().int()),
  createdAt: isoTimestampSchema,
});
export type RecordingSummary = z.infer<typeof recordingSummarySchema>;
