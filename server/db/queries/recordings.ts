/**
 * SQL for recordings, their cues and (for feed captures) their sample chunks. Lists never load
 * the file bytes.
 */
import { asc, desc, eq, getTableColumns } from 'drizzle-orm';
import type { Db } from '../client';
import { recordingChunks, recordingCues, recordings, type RecordingChunkRow, type RecordingCueRow, type RecordingRow } from '../schema';

/** A recording without its file bytes. */
export type RecordingMeta = Omit<RecordingRow, 'fileBytes'>;

export type RecordingValues = Omit<RecordingRow, 'id' | 'createdAt'>;
export type CueValues = Pick<RecordingCueRow, 'onsetS' | 'durationS' | 'label' | 'sampleIndex'>;

const { fileBytes: _omit, ...metaColumns } = getTableColumns(recordings);

/** Inserts a recording and its cues in one transaction; returns the new id. */
export function insertRecording(db: Db, values: RecordingValues, cues: readonly CueValues[], now: Date): number {
  return db.transaction(() => {
    const id = db.orm.insert(recordings).values({ ...values, createdAt: now }).returning({ id: recordings.id }).get().id;
    const insert = db.sqlite.prepare(
      'INSERT INTO recording_cues (recording_id, onset_s, duration_s, label, sample_index) VALUES (?, ?, ?, ?, ?)');
    for (const c of cues) insert.run(id, c.onsetS, c.durationS, c.label, c.sampleIndex);
    return id;
  });
}

export function listRecordings(db: Db, studyId: number): RecordingMeta[] {
  return db.orm.select(metaColumns).from(recordings).where(eq(recordings.studyId, studyId))
    .orderBy(desc(recordings.createdAt), desc(recordings.id)).all();
}

export function findRecording(db: Db, id: number): RecordingMeta | undefined {
  return db.orm.select(metaColumns).from(recordings).where(eq(recordings.id, id)).get();
}

/** The stored file of an uploaded or simulated recording, or null for a chunked one. */
export function recordingFileBytes(db: Db, id: number): Buffer | null {
  return db.orm.select({ b: recordings.fileBytes }).from(recordings).where(eq(recordings.id, id)).get()?.b ?? null;
}

export function listRecordingCues(db: Db, recordingId: number): RecordingCueRow[] {
  return db.orm.select().from(recordingCues).where(eq(recordingCues.recordingId, recordingId))
    .orderBy(asc(recordingCues.onsetS), asc(recordingCues.id)).all();
}

export function listRecordingChunks(db: Db, recordingId: number): RecordingChunkRow[] {
  return db.orm.select().from(recordingChunks).where(eq(recordingChunks.recordingId, recordingId))
    .orderBy(asc(recordingChunks.firstSample)).all();
}
