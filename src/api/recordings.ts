import { z } from 'zod';
import { recordingSummarySchema, type RecordingSummary } from '@shared/api/recordings';
import { http, uploadBytes } from './http';

export function listRecordings(studyId: number): Promise<RecordingSummary[]> {
  return http.get(`/studies/${studyId}/recordings`, { schema: z.array(recordingSummarySchema) });
}

/** Upload an EDF/EDF+/BDF file as raw bytes; the server reads its header and cue annotations. */
export function uploadRecording(studyId: number, file: Blob, name: string, participantId?: number): Promise<RecordingSummary> {
  return uploadBytes(`/studies/${studyId}/recordings`, file, { query: { name, participantId }, schema: recordingSummarySchema });
}
