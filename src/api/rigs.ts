import { z } from 'zod';
import {
  createRigResponseSchema,
  rigSchema,
  type CreateRigRequest,
  type CreateRigResponse,
  type Rig,
  type UpdateRigRequest,
} from '@shared/api/rigs';
import { http } from './http';

export function listRigs(): Promise<Rig[]> {
  return http.get('/rigs', { schema: z.array(rigSchema) });
}

/** Registers a rig; the answer holds its key, which the server never shows again. */
export function createRig(body: CreateRigRequest): Promise<CreateRigResponse> {
  return http.post('/rigs', body, { schema: createRigResponseSchema });
}

export function updateRig(rigId: number, body: UpdateRigRequest): Promise<Rig> {
  return http.patch(`/rigs/${rigId}`, body, { schema: rigSchema });
}
