/**
 * Small schemas reused by several resources. Ids are positive integers; timestamps travel as
 * ISO 8601 strings (UTC).
 */
import { z } from 'zod';

/** A database id in a URL path (`/api/studies/:studyId`), coerced from its string form. */
export const idParamSchema = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER);

/** An id in a response body. */
export const idSchema = z.number().int().positive();

/** An ISO 8601 timestamp in a response body. */
export const isoTimestampSchema = z.string();

/** An e-mail address, trimmed and lower-cased before it is checked. */
export const emailSchema = z.string().trim().toLowerCase().max(254).pipe(z.email('Enter a valid e-mail address'));

/** A calendar date `YYYY-MM-DD` that exists (no 2026-02-30). */
export const isoDateSchema = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
  }, 'Not a calendar date');

/** `?flag=true|false` in a query string. */
export const booleanQuerySchema = z.enum(['true', 'false']).transform((v) => v === 'true');
