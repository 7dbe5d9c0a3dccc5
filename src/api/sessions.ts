import { z } from 'zod';
import {
  displayLinkSchema, sessionDetailSchema, sessionEventSchema, sessionSummarySchema, trialSchema,
  type CreateSessionRequest, type DisplayLink, type SessionDetail, type SessionEvent, type SessionSummary, type Trial,
  type UpdateTrialRequest,
} from '@shared/api/sessions';
import { http } from './http';

export function listSessions(studyId?: number): Promise<SessionSummary[]> {
  return http.get('/sessions', { query: { studyId }, schema: z.array(sessionSummarySchema) });
}

export function getSession(sessionId: number): Promise<SessionDetail> {
  return http.get(`/sessions/${sessionId}`, { schema: sessionDetailSchema });
}

export function createSession(body: CreateSessionRequest): Promise<SessionSummary> {
  return http.post('/sessions', body, { schema: sessionSummarySchema });
}

export type SessionAction = 'start' | 'pause' | 'resume' | 'stop';

/** start refuses with 409 feed-missing / feed-mismatch (the reason names what differs). */
export function sessionAction(sessionId: number, action: SessionAction): Promise<SessionDetail> {
  return http.post(`/sessions/${sessionId}/${action}`, undefined, { schema: sessionDetailSchema });
}

export function annotateSession(sessionId: number, text: string): Promise<SessionEvent> {
  return http.post(`/sessions/${sessionId}/annotations`, { text }, { schema: sessionEventSchema });
}

export function listSessionEvents(sessionId: number): Promise<SessionEvent[]> {
  return http.get(`/sessions/${sessionId}/events`, { schema: z.array(sessionEventSchema) });
}

export function listTrials(sessionId: number): Promise<Trial[]> {
  return http.get(`/sessions/${sessionId}/trials`, { schema: z.array(trialSchema) });
}

export function updateTrial(sessionId: number, trialId: number, body: UpdateTrialRequest): Promise<Trial> {
  return http.patch(`/sessions/${sessionId}/trials/${trialId}`, body, { schema: trialSchema });
}

/** A one-time, session-bound link for the participant's screen; a second use is refused. */
export function createDisplayLink(sessionId: number): Promise<DisplayLink> {
  return http.post(`/sessions/${sessionId}/display-link`, undefined, { schema: displayLinkSchema });
}

export function trialsCsvUrl(sessionId: number): string {
  return `/api/sessions/${sessionId}/trials.csv`;
}
