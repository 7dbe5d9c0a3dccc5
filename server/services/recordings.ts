/**
 * Recordings: EDF/EDF+/BDF uploads (parsed with shared/formats, refused with the file field at
 * fault), recordings captured from a feed (stored as Float64 sample chunks) and simulated ones.
 * Channel labels are stored in canonical 10-10 spelling; every annotation becomes a cue row.
 */
import { createHash } from 'node:crypto';
import type { RecordingSource, RecordingSummary, UploadRecordingQuery } from '../../shared/api/recordings';
import { edfToRecording, EdfFormatError, readEdf, type EdfFormat } from '../../shared/formats/edf';
import { normaliseChannelName } from '../../shared/montage';
import { ParamError, ShapeError, type Annotation, type Recording } from '../../shared/types';
import type { Db } from '../db/client';
import { findParticipant } from '../db/queries/participants';
import {
  findRecording, insertRecording, listRecordingChunks, listRecordingCues, listRecordings, recordingFileBytes,
  type CueValues, type RecordingMeta,
} from '../db/queries/recordings';
import type { Actor, AppContext } from '../context';
import { recordingFileFacts, type RecordingFileFacts, type TrainingRecordingInput } from '../workers/protocol';
import { AppError, notFound } from '../errors';
import { writeAudit } from './audit';
import { getActiveStudy, getStudyOr404 } from './studies';

/** Samples per channel in one stored chunk of a captured recording (10 s at 250 Hz). */
export const CAPTURE_CHUNK_SAMPLES = 2500;

export function toRecordingSummary(r: RecordingMeta): RecordingSummary {
  return {
    id: r.id, studyId: r.studyId, participantId: r.participantId, name: r.name, source: r.source,
    channelNames: r.channelNames, sampleRateHz: r.sampleRateHz, durationS: r.durationS, cueCounts: r.cueCounts,
    createdAt: r.createdAt.toISOString(),
  };
}

function cuesOf(annotations: readonly Annotation[], sampleRateHz: number): { cues: CueValues[]; counts: Record<string, number> } {
  const counts: Record<string, number> = {};
  const cues = annotations.map((a) => {
    counts[a.text] = (counts[a.text] ?? 0) + 1;
    return { onsetS: a.onsetS, durationS: a.durationS ?? 0, label: a.text, sampleIndex: Math.round(a.onsetS * sampleRateHz) };
  });
  return { cues, counts };
}

/** A typed error of the EDF reader (or of the conversion) as a 400 naming the file field. */
function invalidFile(err: unknown): AppError | null {
  if (err instanceof EdfFormatError || err instanceof ShapeError || err instanceof ParamError) {
    return new AppError('invalid-edf', `Not a readable EDF/EDF+/BDF file: ${err.message}`, 400, { [err.field]: err.message });
  }
  return null;
}

/** Parses an EDF/EDF+/BDF file; AppError 400 'invalid-edf' when it is malformed. */
export function parseRecordingFile(bytes: Uint8Array): RecordingFileFacts {
  try {
    const file = readEdf(bytes);
    return recordingFileFacts(edfToRecording(file), file.format);
  } catch (err) {
    throw invalidFile(err) ?? err;
  }
}

export interface NewRecording {
  studyId: number;
  participantId: number | null;
  name: string;
  source: RecordingSource;
  createdBy: number | null;
}

/** Stores a recording file (already parsed: its facts) and its cues; returns the new id. No audit. */
export function insertRecordingFile(db: Db, meta: NewRecording, bytes: Uint8Array, facts: RecordingFileFacts, now: Date): number {
  const samples = facts.sampleCount;
  const { cues, counts } = cuesOf(facts.annotations, facts.sampleRateHz);
  return insertRecording(db, {
    ...meta, format: facts.format.toLowerCase(), channelNames: facts.channelNames.map(normaliseChannelName),
    sampleRateHz: facts.sampleRateHz, sampleCount: samples, durationS: samples / facts.sampleRateHz, cueCounts: counts,
    fileBytes: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength),
    fileSha256: createHash('sha256').update(bytes).digest('hex'),
  }, cues, now);
}

/** Stores continuous samples (µV, [channel][sample]) as Float64 chunks plus cues; returns the new id. No audit. */
export function insertRecordingSamples(db: Db, meta: NewRecording, rec: Recording, now: Date): number {
  const samples = rec.data[0]?.length ?? 0;
  if (rec.data.some((row) => row.length !== samples)) throw new ShapeError('data', 'expected equal lengths on every channel');
  const { cues, counts } = cuesOf(rec.annotations, rec.sampleRateHz);
  return db.transaction(() => {
    const id = insertRecording(db, {
      ...meta, format: 'chunks', channelNames: rec.channelNames.map(normaliseChannelName), sampleRateHz: rec.sampleRateHz,
      sampleCount: samples, durationS: samples / rec.sampleRateHz, cueCounts: counts, fileBytes: null, fileSha256: null,
    }, cues, now);
    const insert = db.sqlite.prepare('INSERT INTO recording_chunks (recording_id, first_sample, sample_count, data) VALUES (?, ?, ?, ?)');
    for (let s0 = 0; s0 < samples; s0 += CAPTURE_CHUNK_SAMPLES) {
      const n = Math.min(CAPTURE_CHUNK_SAMPLES, samples - s0);
      const block = new Float64Array(rec.data.length * n);
      rec.data.forEach((row, c) => block.set(row.subarray(s0, s0 + n), c * n));
      insert.run(id, s0, n, Buffer.from(block.buffer));
    }
    return id;
  });
}

/** Loads a stored recording for training (file bytes or reassembled chunks). */
export function loadTrainingInput(db: Db, id: number): TrainingRecordingInput {
  const meta = findRecording(db, id);
  if (!meta) throw notFound('Recording');
  const annotations = listRecordingCues(db, id).map((c) => ({ onsetS: c.onsetS, durationS: c.durationS, text: c.label }));
  const bytes = recordingFileBytes(db, id);
  if (bytes) return { id, name: meta.name, kind: 'file', bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), annotations };
  const channels = meta.channelNames.length;
  const data = meta.channelNames.map(() => new Float64Array(meta.sampleCount));
  for (const chunk of listRecordingChunks(db, id)) {
    const block = new Float64Array(chunk.data.buffer.slice(chunk.data.byteOffset, chunk.data.byteOffset + chunk.data.byteLength));
    if (block.length !== channels * chunk.sampleCount) throw new ShapeError('recording_chunks.data', `chunk at ${chunk.firstSample} has the wrong size`);
    for (let c = 0; c < channels; c++) data[c]!.set(block.subarray(c * chunk.sampleCount, (c + 1) * chunk.sampleCount), chunk.firstSample);
  }
  return { id, name: meta.name, kind: 'samples', channelNames: meta.channelNames, sampleRateHz: meta.sampleRateHz, data, annotations };
}

export function recordingService(ctx: AppContext) {
  const { db } = ctx;
  return {
    list(studyId: number): RecordingSummary[] {
      getStudyOr404(db, studyId);
      return listRecordings(db, studyId).map(toRecordingSummary);
    },

    get(recordingId: number): RecordingSummary {
      const r = findRecording(db, recordingId);
      if (!r) throw notFound('Recording');
      return toRecordingSummary(r);
    },

    /** Parses and stores an uploaded EDF/EDF+/BDF file. */
    upload(studyId: number, q: UploadRecordingQuery, bytes: Uint8Array | undefined, actor: Actor): RecordingSummary {
      getActiveStudy(db, studyId);
      if (q.participantId !== undefined && !findParticipant(db, studyId, q.participantId)) {
        throw new AppError('validation', 'No such participant in this study', 400, { participantId: 'Not a participant of this study' });
      }
      if (!bytes || bytes.byteLength === 0) {
        throw new AppError('invalid-edf', 'Send the file as the request body (Content-Type application/octet-stream)', 400,
          { body: 'Expected the EDF/EDF+/BDF file bytes' });
      }
      const parsed = parseRecordingFile(bytes);
      const now = ctx.now();
      const id = db.transaction(() => {
        const newId = insertRecordingFile(db, { studyId, participantId: q.participantId ?? null, name: q.name, source: 'upload',
          createdBy: actor.id }, bytes, parsed, now);
        writeAudit(db, actor, { action: 'recording.upload', targetType: 'recording', targetId: newId,
          details: { studyId, name: q.name, format: parsed.format, bytes: bytes.byteLength } }, now);
        return newId;
      });
      return toRecordingSummary(findRecording(db, id)!);
    },

    /**
     * Stores a recording captured from a feed (or any in-memory Recording) as sample chunks, e.g.
     * a pilot session's raw signal with its cues (source 'session'). `actor` null for the system.
     */
    saveSamples(meta: NewRecording, rec: Recording, actor: Actor | null): RecordingSummary {
      const now = ctx.now();
      const id = db.transaction(() => {
        getStudyOr404(db, meta.studyId);
        const newId = insertRecordingSamples(db, meta, rec, now);
        writeAudit(db, actor, { action: 'recording.save', targetType: 'recording', targetId: newId,
          details: { studyId: meta.studyId, name: meta.name, source: meta.source } }, now);
        return newId;
      });
      return toRecordingSummary(findRecording(db, id)!);
    },
  };
}
export type RecordingService = ReturnType<typeof recordingService>;
