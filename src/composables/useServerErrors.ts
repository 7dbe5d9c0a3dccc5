import { ref } from 'vue';
import type { z } from 'zod';
import { FORM_FIELD, zodFieldErrors } from '@shared/api/errors';
import { toApiError, type ApiError, type FieldErrors } from '../api/http';

/**
 * Holds what the server said about a form submission: a message for the whole form and one per
 * field path (`name`, `cueClasses.1`). `fieldError('cueClasses')` also picks up messages for the
 * field's items, so a list input shows why one of its entries was refused.
 */
export function useServerErrors() {
  const fields = ref<FieldErrors>({});
  const message = ref<string | null>(null);

  function clear(): void {
    fields.value = {};
    message.value = null;
  }

  /** Record a failure; returns it for callers that need the code. */
  function capture(e: unknown): ApiError {
    const err = toApiError(e);
    fields.value = { ...err.fields };
    const formLevel = err.fields[FORM_FIELD];
    message.value = formLevel ?? err.message;
    return err;
  }

  /**
   * Check a form against the same zod schema the server applies; on failure the messages land
   * on the fields exactly as a 400 from the server would, and null comes back.
   */
  function check<S extends z.ZodType>(schema: S, data: unknown): z.output<S> | null {
    const parsed = schema.safeParse(data);
    if (parsed.success) {
      clear();
      return parsed.data;
    }
    fields.value = zodFieldErrors(parsed.error);
    message.value = fields.value[FORM_FIELD] ?? 'Some fields need attention.';
    return null;
  }

  function fieldError(path: string): string {
    const exact = fields.value[path];
    if (exact) return exact;
    const prefix = `${path}.`;
    for (const [key, value] of Object.entries(fields.value)) {
      if (!key.startsWith(prefix)) continue;
      const rest = key.slice(prefix.length);
      return /^\d+$/.test(rest) ? `Entry ${Number(rest) + 1}: ${value}` : `${rest}: ${value}`;
    }
    return '';
  }

  return { fields, message, clear, capture, check, fieldError };
}
