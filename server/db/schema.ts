/**
 * Every table of the Aftercue database. camelCase keys map to explicit snake_case columns;
 * times are integer milliseconds since the epoch (`timestamp_ms`), booleans are 0/1 integers.
 * Only server/db/queries/* import these tables.
 */
import { sql } from 'drizzle-orm';
import { blob, index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import type { ConsentStatus, Recipe, Role, SessionEventKind, SessionStatus, StudyStatus, TrialFlag, TrialLatency } from '../../shared/api';

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

/** Files attached to an outbox message (e.g. a gap review PDF), as the in-process SMTP server received them. */
export const mailAttachments = sqliteTable('mail_attachments', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  mailId: integer('mail_id').notNull().references(() => mailOutbox.id, { onDelete: 'cascade' }),
  fileName: text('file_name').notNull(),
  contentType: text('content_type').notNull(),
  size: integer('size').notNull(),
  content: blob('content', { mode: 'buffer' }).notNull(),
}, (t) => [index('mail_attachments_mail_idx').on(t.mailId)]);

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

/**
 * One continuous stream from a rig: a bridge session (HELLO's bridgeSessionId). It outlives
 * connections: `durable_seq` / `next_sample` are what is stored, so a bridge can resume after a
 * reconnect or a server restart. Written with the chunks, in the same transaction.
 */
export const feeds = sqliteTable('feeds', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  rigId: integer('rig_id').notNull().references(() => rigs.id),
  bridgeSessionId: text('bridge_session_id').notNull(),
  channelNames: text('channel_names', { mode: 'json' }).$type<string[]>().notNull(),
  units: text('units', { mode: 'json' }).$type<string[]>().notNull(),
  sampleRateHz: real('sample_rate_hz').notNull(),
  /** ISO 8601 time of sample 0, as the bridge gave it. */
  startTime: text('start_time').notNull(),
  /** Last stored (and acknowledged) sequence number; 0 = none. */
  durableSeq: integer('durable_seq').notNull().default(0),
  /** Next sample index after everything stored. */
  nextSample: integer('next_sample').notNull().default(0),
  createdAt: createdAt(),
  lastSeenAt: integer('last_seen_at', { mode: 'timestamp_ms' }).notNull(),
}, (t) => [uniqueIndex('feeds_rig_bridge_uq').on(t.rigId, t.bridgeSessionId)]);

/**
 * Raw samples of a feed exactly as received: `samples` is little-endian float32 interleaved
 * [sample][channel] over all the feed's channels, µV (NaN kept: it is data).
 */
export const feedChunks = sqliteTable('feed_chunks', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  feedId: integer('feed_id').notNull().references(() => feeds.id, { onDelete: 'cascade' }),
  seq: integer('seq').notNull(),
  firstSample: integer('first_sample').notNull(),
  sampleCount: integer('sample_count').notNull(),
  channelCount: integer('channel_count').notNull(),
  samples: blob('samples', { mode: 'buffer' }).notNull(),
}, (t) => [
  uniqueIndex('feed_chunks_feed_seq_uq').on(t.feedId, t.seq),
  index('feed_chunks_feed_sample_idx').on(t.feedId, t.firstSample),
]);

/** Cue markers and announced gaps of a feed. A gap covers [sample, to_sample); `seq` is its last seq. */
export const feedMarks = sqliteTable('feed_marks', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  feedId: integer('feed_id').notNull().references(() => feeds.id, { onDelete: 'cascade' }),
  seq: integer('seq').notNull(),
  kind: text('kind').$type<'cue' | 'gap'>().notNull(),
  sample: integer('sample').notNull(),
  toSample: integer('to_sample'),
  cueId: integer('cue_id'),
  label: text('label'),
  /** 'source' | 'overflow' for gaps. */
  reason: text('reason'),
}, (t) => [
  uniqueIndex('feed_marks_feed_seq_uq').on(t.feedId, t.seq),
  index('feed_marks_feed_sample_idx').on(t.feedId, t.sample),
]);

/**
 * A closed-loop run of one frozen decoder with one participant on one rig. Its samples are the
 * feed's [start_sample, stop_sample) (stop_sample null while it runs).
 */
export const pilotSessions = sqliteTable('pilot_sessions', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  studyId: integer('study_id').notNull().references(() => studies.id),
  participantId: integer('participant_id').notNull().references(() => participants.id),
  rigId: integer('rig_id').notNull().references(() => rigs.id),
  decoderId: integer('decoder_id').notNull().references(() => decoders.id),
  status: text('status').$type<SessionStatus>().notNull().default('ready'),
  notes: text('notes').notNull().default(''),
  feedId: integer('feed_id').references(() => feeds.id),
  startSample: integer('start_sample'),
  stopSample: integer('stop_sample'),
  droppedSamples: integer('dropped_samples').notNull().default(0),
  gapCount: integer('gap_count').notNull().default(0),
  /** Artifact limits in force ({source, windows, channelNames, peakToPeakLimitUv, ...}), once set. */
  artifactLimits: text('artifact_limits', { mode: 'json' }).$type<Record<string, unknown>>(),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  startedAt: integer('started_at', { mode: 'timestamp_ms' }),
  stoppedAt: integer('stopped_at', { mode: 'timestamp_ms' }),
}, (t) => [
  index('pilot_sessions_study_idx').on(t.studyId),
  index('pilot_sessions_rig_status_idx').on(t.rigId, t.status),
]);

/** One cue of a session and its prediction. Ids are given by the live engine (it writes off-thread). */
export const trials = sqliteTable('trials', {
  id: integer('id').primaryKey(),
  sessionId: integer('session_id').notNull().references(() => pilotSessions.id, { onDelete: 'cascade' }),
  cueId: integer('cue_id').notNull(),
  /** Feed sample index of the cue. */
  sampleIndex: integer('sample_index').notNull(),
  onsetS: real('onset_s').notNull(),
  trueClass: text('true_class'),
  predictedClass: text('predicted_class').notNull(),
  /** One per class, in the decoder's class order. */
  probabilities: text('probabilities', { mode: 'json' }).$type<number[]>().notNull(),
  latency: text('latency', { mode: 'json' }).$type<TrialLatency>().notNull(),
  flags: text('flags', { mode: 'json' }).$type<TrialFlag[]>().notNull(),
  /** Channels beyond their artifact limit (names), for the gap review. */
  artifactChannels: text('artifact_channels', { mode: 'json' }).$type<string[]>().notNull(),
  markedBad: integer('marked_bad', { mode: 'boolean' }).notNull().default(false),
  note: text('note'),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('trials_session_cue_uq').on(t.sessionId, t.cueId)]);

/** What happened during a session (gap, pause, resume, annotation, flag, start, stop). */
export const sessionEvents = sqliteTable('session_events', {
  id: integer('id').primaryKey(),
  sessionId: integer('session_id').notNull().references(() => pilotSessions.id, { onDelete: 'cascade' }),
  at: integer('at', { mode: 'timestamp_ms' }).notNull(),
  kind: text('kind').$type<SessionEventKind>().notNull(),
  text: text('text').notNull(),
  sampleIndex: integer('sample_index'),
}, (t) => [index('session_events_session_idx').on(t.sessionId, t.id)]);

/** One-time links for the participant display; only the SHA-256 (hex) of a token is stored. */
export const displayTokens = sqliteTable('display_tokens', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  sessionId: integer('session_id').notNull().references(() => pilotSessions.id, { onDelete: 'cascade' }),
  tokenHash: text('token_hash').notNull().unique(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
}, (t) => [index('display_tokens_session_idx').on(t.sessionId)]);

/** Rigs served by the synthetic bridge inside the server (the demo rig): `profile` names its simulation profile. */
export const embeddedRigs = sqliteTable('embedded_rigs', {
  rigId: integer('rig_id').primaryKey().references(() => rigs.id, { onDelete: 'cascade' }),
  profile: text('profile').notNull(),
});

export type UserRow = typeof users.$inferSelect;
export type StudyRow = typeof studies.$inferSelect;
export type ParticipantRow = typeof participants.$inferSelect;
export type RigRow = typeof rigs.$inferSelect;
export type PasswordTokenRow = typeof passwordTokens.$inferSelect;
export type MailRow = typeof mailOutbox.$inferSelect;
export type MailAttachmentRow = typeof mailAttachments.$inferSelect;
export type AuditRow = typeof auditLog.$inferSelect;
export type RecordingRow = typeof recordings.$inferSelect;
export type RecordingCueRow = typeof recordingCues.$inferSelect;
export type RecordingChunkRow = typeof recordingChunks.$inferSelect;
export type DecoderRow = typeof decoders.$inferSelect;
export type TrainingJobRow = typeof trainingJobs.$inferSelect;
export type FeedRow = typeof feeds.$inferSelect;
export type FeedChunkRow = typeof feedChunks.$inferSelect;
export type FeedMarkRow = typeof feedMarks.$inferSelect;
export type PilotSessionRow = typeof pilotSessions.$inferSelect;
export type TrialRow = typeof trials.$inferSelect;
export type SessionEventRow = typeof sessionEvents.$inferSelect;
export type DisplayTokenRow = typeof displayTokens.$inferSelect;
