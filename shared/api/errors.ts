/**
 * The one error body every API failure returns, and the mapping from zod issues to the
 * per-field messages a form displays. Framework-free.
 */
import { z } from 'zod';

/** Field path (dot-joined, e.g. `channelNames.3`) -> first message for that field. */
export type FieldErrors = Record<string, string>;

/** Key used in FieldErrors for a problem with the body as a whole (wrong type, not an object). */
export const FORM_FIELD = '_form';

/**
 * Error codes the API returns in `error.code`. Features add their own codes; these are the
 * cross-cutting ones: 400 validation | invalid-json, 401 unauthenticated | invalid-credentials,
 * 403 forbidden | csrf | account-disabled, 404 not-found, 409 conflict codes,
 * 413 payload-too-large, 429 rate-limited, 500 internal.
 */
export type ErrorCode =
  | 'validation'
  | 'invalid-json'
  | 'unauthenticated'
  | 'invalid-credentials'
  | 'forbidden'
  | 'csrf'
  | 'account-disabled'
  | 'not-found'
  | 'payload-too-large'
  | 'rate-limited'
  | 'invalid-token'
  | 'duplicate-email'
  | 'duplicate-code'
  | 'duplicate-name'
  | 'own-account'
  | 'study-archived'
  | 'mail-failed'
  | 'internal'
  | (string & {});

/** `{ "error": { "code", "message", "fields"? } }` — the body of every 4xx/5xx answer. */
export const apiErrorBodySchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    fields: z.record(z.string(), z.string()).optional(),
  }),
});
export type ApiErrorBody = z.infer<typeof apiErrorBodySchema>;

/**
 * Turns zod issues into one message per field path. Unknown keys of a strict object are
 * reported under their own name ("Unknown field"); problems with the whole body under FORM_FIELD.
 */
export function zodFieldErrors(error: z.ZodError): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    const base = issue.path.map(String).join('.');
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        const path = base ? `${base}.${key}` : key;
        fields[path] ??= 'Unknown field';
      }
      continue;
    }
    fields[base || FORM_FIELD] ??= issue.message;
  }
  return fields;
}
