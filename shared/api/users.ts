/** User accounts (admin only): list, invite, change role / display name / disabled. */
import { z } from 'zod';
import { emailSchema, idSchema, isoTimestampSchema } from './common';
import { roleSchema } from './auth';

/** A display name: 1..80 characters after trimming. */
export const displayNameSchema = z.string().trim().min(1, 'Enter a display name').max(80);

/** GET /api/users -> User[]; POST /api/users/invitations -> 201 User; PATCH /api/users/:userId -> User. */
export const userSchema = z.object({
  id: idSchema,
  email: z.string(),
  displayName: z.string(),
  role: roleSchema,
  disabled: z.boolean(),
  /** False while an invitation is pending (no password set yet). */
  passwordSet: z.boolean(),
  createdAt: isoTimestampSchema,
  lastLoginAt: isoTimestampSchema.nullable(),
});
export type User = z.infer<typeof userSchema>;

/** POST /api/users/invitations body; 409 duplicate-email when the address is taken. Sends the invitation mail. */
export const inviteUserRequestSchema = z.strictObject({
  email: emailSchema,
  displayName: displayNameSchema,
  role: roleSchema,
});
export type InviteUserRequest = z.infer<typeof inviteUserRequestSchema>;

/** PATCH /api/users/:userId body (at least one field); 409 own-account when an admin would disable or demote themselves. */
export const updateUserRequestSchema = z.strictObject({
  role: roleSchema.optional(),
  disabled: z.boolean().optional(),
  displayName: displayNameSchema.optional(),
}).refine((b) => Object.keys(b).length > 0, { message: 'Change at least one field' });
export type UpdateUserRequest = z.infer<typeof updateUserRequestSchema>;
