/**
 * Sign-in, the signed-in user, CSRF and the password flows (invitation and reset).
 *
 * CSRF lifecycle: GET /api/auth/csrf returns a token bound to the browser's session cookie.
 * Every POST/PUT/PATCH/DELETE under /api (login included) sends it in the `X-CSRF-Token`
 * header; without it, or with a stale one, the answer is 403 `{ error: { code: 'csrf' } }`.
 * Login and logout rotate the session id but keep the token, so one token serves a tab until
 * its session expires; on a 403 'csrf' a client fetches a fresh token and retries once.
 */
import { z } from 'zod';
import { emailSchema, idSchema } from './common';
import { ALL_PERMISSIONS, ROLES } from './roles';

/** Minimum length of a password (characters). */
export const PASSWORD_MIN_LENGTH = 10;
/** Maximum length accepted: bcrypt reads at most 72 bytes, longer input is refused. */
export const PASSWORD_MAX_BYTES = 72;

/** Zod schema of a role name. */
export const roleSchema = z.enum(ROLES as [typeof ROLES[number], ...typeof ROLES[number][]]);
/** Zod schema of a permission name. */
export const permissionSchema = z.enum(ALL_PERMISSIONS as [typeof ALL_PERMISSIONS[number], ...typeof ALL_PERMISSIONS[number][]]);

/** GET /api/auth/csrf -> 200. */
export const csrfResponseSchema = z.object({ token: z.string() });
export type CsrfResponse = z.infer<typeof csrfResponseSchema>;

/** POST /api/auth/login body. Answers 200 Me, 401 invalid-credentials, 403 account-disabled, 429 rate-limited. */
export const loginRequestSchema = z.strictObject({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(1024),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

/** GET /api/auth/me and POST /api/auth/login -> 200: the signed-in user and what they may do. */
export const meSchema = z.object({
  id: idSchema,
  email: z.string(),
  displayName: z.string(),
  role: roleSchema,
  permissions: z.array(permissionSchema),
});
export type Me = z.infer<typeof meSchema>;

/** POST /api/auth/password-reset body -> 202 always (mail only if the account exists and is enabled). */
export const passwordResetRequestSchema = z.strictObject({ email: emailSchema });
export type PasswordResetRequest = z.infer<typeof passwordResetRequestSchema>;

/** A new password: at least PASSWORD_MIN_LENGTH characters, at most 72 bytes in UTF-8. */
export const newPasswordSchema = z.string()
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .refine((p) => new TextEncoder().encode(p).length <= PASSWORD_MAX_BYTES,
    `Use at most ${PASSWORD_MAX_BYTES} bytes`);

/**
 * POST /api/auth/set-password body -> 204; 400 invalid-token when the token is unknown, used
 * or expired. The token comes from the link in an invitation (valid 72 h) or reset mail (1 h):
 * `${publicUrl}/set-password?token=...`. Single use.
 */
export const setPasswordRequestSchema = z.strictObject({
  token: z.string().min(1, 'The link has no token').max(200),
  password: newPasswordSchema,
});
export type SetPasswordRequest = z.infer<typeof setPasswordRequestSchema>;
