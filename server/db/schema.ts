/**
 * Every table of the Aftercue database. camelCase keys map to explicit snake_case columns;
 * times are integer milliseconds since the epoch (`timestamp_ms`), booleans are 0/1 integers.
 * Only server/db/queries/* import these tables.
 */
import { sql } from 'drizzle-orm';
import { blob, index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import type { ConsentStatus, Recipe, Role, StudyStatus } from '../../shared/api';

const createdAt = () => integer('created_at', { mode: 'timestamp_ms' }).notNull();
const updatedAt = () => integer('updated_at', { mode: 'timestamp_ms' }).notNull();

export const users = sqliteTable('users', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  /** Stored lower-cased and trimmed. */
  email: text('email').notNull().unique(),
  displayName: text('display_name').notNull(),
  role: text('role').$type<Role>().notNull(),
  /** bcrypt hash; null until the invited user sets a password. */
  passwordHash: text('password_hash'),
  disabled: integer('disabled', { mode: 'boolean' }).notNull().default(false),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
  lastLoginAt: integer('last_login_at', { mode: 'timestamp_ms' }),
});

/** express-session rows: `sess` is the session as JSON, `expires` in ms. */
export const loginSessions = sqliteTable('login_sessions', {
  sid: text('sid').primaryKey(),
  sess: text('sess').notNull(),
  expires: integer('expires').notNull(),
}, (t) => [index('login_sessions_expires_idx').on(t.expires)]);

export const studies = sqliteTable('studies', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
  ethicsReference: text('ethics_reference').notNull(),
  cueClasses: text('cue_classes', { mode: 'json' }).$type<string[]>().notNull(),
  epochStartS: real('epoch_start_s').notNull(),
  epochEndS: real('epoch_end_s').notNull(),
  channelNames: text('channel_names', { mode: 'json' }).$type<string[]>().notNull(),
  sampleRateHz: real('sample_rate_hz').notNull(),
  powerLineHz: integer('power_line_hz').$type<50 | 60>().notNull(),
  recipe: text('recipe').$type<Recipe>().notNull(),
  status: text('status').$type<StudyStatus>().notNull().default('active'),
  createdBy: integer('created_by').notNull().references(() => users.id),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
  archivedAt: integer('archived_at', { mode: 'timestamp_ms' }),
}, (t) => [index('studies_status_idx').on(t.status)]);

/** Pseudonymous participants. There is deliberately no name column. */
export const participants = sqliteTable('participants', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  studyId: integer('study_id').notNull().references(() => studies.id),
  code: text('code').notNull(),
  consentStatus: text('consent_status').$type<ConsentStatus>().notNull(),
  /** YYYY-MM-DD */
  consentDate: text('consent_date'),
  notes: text('notes').notNull().default(''),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, (t) => [
  // Codes are unique within a study regardless of case: 'P-001' and 'p-001' would be confused.
  uniqueIndex('participants_study_code_uq').on(t.studyId, sql`lower(${t.code})`),
]);

export const rigs = sqliteTable('rigs', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull().unique(),
  location: text('location'),
  /** SHA-256 (hex) of the rig key; the key itself is never stored. */
  keyHash: text('key_hash').notNull().unique(),
  retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
  createdBy: integer('created_by').references(() => users.id),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
  lastSeenAt: integer('last_seen_at', { mode: 'timestamp_ms' }),
});

/** Invitation and reset tokens; only the SHA-256 (hex) of a token is stored. */
export const passwordTokens = sqliteTable('password_tokens', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  userId: integer('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  purpose: text('purpose').$type<'invite' | 'reset'>().notNull(),
  tokenHash: text('token_hash').notNull().unique(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
}, (t) => [index('password_tokens_user_idx').on(t.userId)]);

export const mailOutbox = sqliteTable('mail_outbox', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  messageId: text('message_id'),
  fromAddress: text('from_address').notNull(),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  htmlBody: text('html_body'),
  transport: text('transport').$type<'in-process' | 'relay'>().notNull(),
  receivedAt: integer('received_at', { mode: 'timestamp_ms' }).notNull(),
}, (t) => [index('mail_outbox_received_idx').on(t.receivedAt)]);

export const auditLog = sqliteTable('audit_log', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  at: integer('at', { mode: 'timestamp_ms' }).notNull(),
  actorId: integer('actor_id').references(() => users.id, { onDelete: 'set null' }),
  /** Snapshot of the actor's e-mail (or the address tried, for a failed login). */
  actorEmail: text('actor_email'),
  action: text('action').notNull(),
  targetType: text('target_type').notNull(),
  targetId: text('target_id'),
  details: text('details', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
}, (t) => [
  index('audit_log_at_idx').on(t.at),
  index('audit_log_target_idx').on(t.targetType, t.targetId),
]);

/** Where a recording came from. */
export type RecordingSource = 'upload' | 'session' | 'simulated';
/** Where a decoder came from. */
export type DecoderSource = 'import' | 'training-job' | 'demo';
export type DecoderStatus = 'draft' | 'frozen';
export type TrainingJobStatus = 'queued' | 'running' | 'done' | 'failed';

/**
 * Stored continuous EEG with cue markers. An uploaded or simulated recording keeps its EDF/EDF+/BDF
 * file in `file_bytes`; a recording captured from a feed may instead keep its samples as
 * `recording_chunks` rows (then `file_bytes` is null). Cues are rows of `recording_cues`.
 */
export const recordings = sqliteTable('recordings', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  studyId: integer('study_id').notNull().references(() => studies.id),
  participantId: integer('participant_id').references(() => participants.id),
  name: text('name').notNull(),
  source: text('source').$type<RecordingSource>().notNull(),
  /** 'edf' | 'edf+c' | 'edf+d' | 'bdf' | 'bdf+c' | 'bdf+d' for files; 'chunks' for chunked samples. */
  format: text('format').notNull(),
  channelNames: text('channel_names', { mode: 'json' }).$type<string[]>().notNull(),
  sampleRateHz: real('sample_rate_hz').notNull(),
  sampleCount: integer('sample_count').notNull(),
  durationS: real('duration_s').notNull(),
  /** Cue label -> number of cues, kept beside the cue rows for cheap listing. */
  cueCounts: text('cue_counts', { mode: 'json' }).$type<Record<string, number>>().notNull(),
  fileBytes: blob('file_bytes', { mode: 'buffer' }),
  fileSha256: text('file_sha256'),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
}, (t) => [index('recordings_study_idx').on(t.studyId)]);

/** One cue (annotation) of a recording; onset in seconds from the recording start. */
export const recordingCues = sqliteTable('recording_cues', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  recordingId: integer('recording_id').notNull()
    .references(() => recordings.id, { onDelete: 'cascade' }),
  onsetS: real('onset_s').notNull(),
  durationS: real('duration_s').notNull().default(0),
  label: text('label').notNull(),
  sampleIndex: integer('sample_index').notNull(),
}, (t) => [index('recording_cues_recording_idx').on(t.recordingId, t.onsetS)]);

/**
 * Samples of a chunked recording: `data` is little-endian Float64, channel-major
 * ([channel][sample], `sample_count` samples per channel), in µV.
 */
export const recordingChunks = sqliteTable('recording_chunks', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  recordingId: integer('recording_id').notNull()
    .references(() => recordings.id, { onDelete: 'cascade' }),
  firstSample: integer('first_sample').notNull(),
  sampleCount: integer('sample_count').notNull(),
  data: blob('data', { mode: 'buffer' }).notNull(),
}, (t) => [uniqueIndex('recording_chunks_recording_first_uq').on(t.recordingId, t.firstSample)]);

/**
 * A trained pipeline. `artifact` is the artifact JSON exactly as sealed; `sha256` is its seal.
 * Once `status` is 'frozen', `artifact` and `sha256` never change (the service refuses).
 */
export const decoders = sqliteTable('decoders', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  studyId: integer('study_id').notNull().references(() => studies.id),
  name: text('name').notNull(),
  recipe: text('recipe').$type<Recipe>().notNull(),
  classes: text('classes', { mode: 'json' }).$type<string[]>().notNull(),
  channelNames: text('channel_names', { mode: 'json' }).$type<string[]>().notNull(),
  sampleRateHz: real('sample_rate_hz').notNull(),
  epochStartS: real('epoch_start_s').notNull(),
  epochEndS: real('epoch_end_s').notNull(),
  artifact: text('artifact').notNull(),
  sha256: text('sha256').notNull(),
  status: text('status').$type<DecoderStatus>().notNull().default('draft'),
  /** Headline figures for lists: {cvAccuracy, wilson95, chanceThreshold95, trials}. */
  metrics: text('metrics', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  /** The training report (null when an imported artifact came without one). */
  report: text('report', { mode: 'json' }).$type<Record<string, unknown>>(),
  interpretation: text('interpretation', { mode: 'json' }).$type<Record<string, unknown>>(),
  source: text('source').$type<DecoderSource>().notNull(),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  frozenAt: integer('frozen_at', { mode: 'timestamp_ms' }),
  frozenBy: integer('frozen_by').references(() => users.id, { onDelete: 'set null' }),
}, (t) => [
  index('decoders_study_idx').on(t.studyId),
  index('decoders_sha256_idx').on(t.sha256),
]);

/** Offline fit + nested cross-validation, run one at a time in a worker thread. */
export const trainingJobs = sqliteTable('training_jobs', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  studyId: integer('study_id').notNull().references(() => studies.id),
  name: text('name').notNull(),
  status: text('status').$type<TrainingJobStatus>().notNull().default('queued'),
  /** 0..1 */
  progress: real('progress').notNull().default(0),
  stage: text('stage').notNull().default('queued'),
  /** Request parameters: recordingIds, recipe, classes, folds, inner, seed, components, prior. */
  params: text('params', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  /** 'user' for a requested job; 'demo' for the seeded demo decoder (frozen when done). */
  purpose: text('purpose').$type<'user' | 'demo'>().notNull().default('user'),
  error: text('error'),
  decoderId: integer('decoder_id').references(() => decoders.id, { onDelete: 'set null' }),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  startedAt: integer('started_at', { mode: 'timestamp_ms' }),
  finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
}, (t) => [
  index('training_jobs_study_idx').on(t.studyId),
  index('training_jobs_status_idx').on(t.status),
]);

export type UserRow = typeof users.$inferSelect;
export type StudyRow = typeof studies.$inferSelect;
export type ParticipantRow = typeof participants.$inferSelect;
export type RigRow = typeof rigs.$inferSelect;
export type PasswordTokenRow = typeof passwordTokens.$inferSelect;
export type MailRow = typeof mailOutbox.$inferSelect;
export type AuditRow = typeof auditLog.$inferSelect;
export type RecordingRow = typeof recordings.$inferSelect;
export type RecordingCueRow = typeof recordingCues.$inferSelect;
export type RecordingChunkRow = typeof recordingChunks.$inferSelect;
export type DecoderRow = typeof decoders.$inferSelect;
export type TrainingJobRow = typeof trainingJobs.$inferSelect;
