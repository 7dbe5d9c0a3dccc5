import { z } from 'zod';
import {
  participantSchema,
  type CreateParticipantRequest,
  type Participant,
  type UpdateParticipantRequest,
} from '@shared/api/participants';
import { http } from './http';

export function listParticipants(studyId: number): Promise<Participant[]> {
  return http.get(`/studies/${studyId}/participants`, { schema: z.array(participantSchema) });
}

export function createParticipant(studyId: number, body: CreateParticipantRequest): Promise<Participant> {
  return http.post(`/studies/${studyId}/participants`, body, { schema: participantSchema });
}

export function updateParticipant(studyId: number, participantId: number, body: UpdateParticipantRequest): Promise<Participant> {
  return http.patch(`/studies/${studyId}/participants/${participantId}`, body, { schema: participantSchema });
}
