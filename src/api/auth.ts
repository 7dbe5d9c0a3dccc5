import { z } from 'zod';
import {
  meSchema,
  type LoginRequest,
  type Me,
  type PasswordResetRequest,
  type SetPasswordRequest,
} from '@shared/api/auth';
import { http, resetCsrfToken } from './http';

/** The signed-in user; rejects with ApiError status 401 when signed out. */
export function getMe(): Promise<Me> {
  return http.get('/auth/me', { schema: meSchema });
}

/** Sign in; the server regenerates the session, so the cached CSRF token is dropped afterwards. */
export async function login(body: LoginRequest): Promise<Me> {
  const me = await http.post('/auth/login', body, { schema: meSchema });
  resetCsrfToken();
  return me;
}

export async function logout(): Promise<void> {
  try {
    await http.post('/auth/logout', undefined, { schema: z.unknown() });
  } finally {
    resetCsrfToken();
  }
}

/** Always 202: the server does not reveal whether the address has an account. */
export async function requestPasswordReset(body: PasswordResetRequest): Promise<void> {
  await http.post('/auth/password-reset', body, { schema: z.unknown() });
}

/** Sets the password from an invitation or reset link token (single use). */
export async function setPassword(body: SetPasswordRequest): Promise<void> {
  await http.post('/auth/set-password', body, { schema: z.unknown() });
}
