import { healthResponseSchema, type HealthResponse } from '@shared/api/health';
import { http } from './http';

/** Liveness and the running server version (public). */
export function getHealth(): Promise<HealthResponse> {
  return http.get('/health', { schema: healthResponseSchema });
}
