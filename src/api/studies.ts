import { z } from 'zod';
import { studySchema, type CreateStudyRequest, type Study, type UpdateStudyRequest } from '@shared/api/studies';
import { http } from './http';

export interface StudyFilter {
  /** Archived studies are left out unless asked for. */
  includeArchived?: boolean;
}

export function listStudies(filter: StudyFilter = {}): Promise<Study[]> {
  return http.get('/studies', {
    query: { includeArchived: filter.includeArchived ? 'true' : undefined },
    schema: z.array(studySchema),
  });
}

export function getStudy(studyId: number): Promise<Study> {
  return http.get(`/studies/${studyId}`, { schema: studySchema });
}

export function createStudy(body: CreateStudyRequest): Promise<Study> {
  return http.post('/studies', body, { schema: studySchema });
}

export function updateStudy(studyId: number, body: UpdateStudyRequest): Promise<Study> {
  return http.patch(`/studies/${studyId}`, body, { schema: studySchema });
}

/** Archiving makes the study read-only; it stays listed under "include archived". */
export function archiveStudy(studyId: number): Promise<Study> {
  return http.post(`/studies/${studyId}/archive`, undefined, { schema: studySchema });
}
