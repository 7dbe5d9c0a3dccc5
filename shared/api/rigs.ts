/**
 * Rigs: registered recording stations. A rig authenticates its feed with a rig key, shown once
 * at creation (`rig_` + 32 random bytes in base64url); the server keeps only its SHA-256.
 */
import { z } from 'zod';
import { idSchema, isoTimestampSchema } from './common';

/** GET /api/rigs -> Rig[]; PATCH /api/rigs/:rigId -> Rig. */
export const rigSchema = z.object({
  id: idSchema,
  name: z.string(),
  location: z.string().nullable(),
  retired: z.boolean(),
  createdAt: isoTimestampSchema,
  /** When a feed last authenticated with this rig's key; null until then. */
  lastSeenAt: isoTimestampSchema.nullable(),
});
export type Rig = z.infer<typeof rigSchema>;

const rigNameSchema = z.string().trim().min(1, 'Enter a name').max(80);
const rigLocationSchema = z.string().trim().max(120);

/** POST /api/rigs body; 409 duplicate-name when another rig has the name. */
export const createRigRequestSchema = z.strictObject({
  name: rigNameSchema,
  location: rigLocationSchema.optional(),
});
export type CreateRigRequest = z.infer<typeof createRigRequestSchema>;

/** POST /api/rigs -> 201: the rig and its key; the key is never shown again. */
export const createRigResponseSchema = z.object({
  rig: rigSchema,
  rigKey: z.string().regex(/^rig_[A-Za-z0-9_-]{43}$/),
});
export type CreateRigResponse = z.infer<typeof createRigResponseSchema>;

/** PATCH /api/rigs/:rigId body (at least one field). An empty location clears it. */
export const updateRigRequestSchema = z.strictObject({
  name: rigNameSchema.optional(),
  location: rigLocationSchema.optional(),
  retired: z.boolean().optional(),
}).refine((b) => Object.keys(b).length > 0, { message: 'Change at least one field' });
export type UpdateRigRequest = z.infer<typeof updateRigRequestSchema>;
