/** Request parsing with the shared zod schemas: 400 'validation' with field errors, or 404 for a bad id. */
import type { z } from 'zod';
import { idParamSchema, zodFieldErrors } from '../../shared/api';
import { AppError, validationError } from '../errors';

export function parseBody<S extends z.ZodType>(schema: S, body: unknown): z.output<S> {
  const r = schema.safeParse(body);
  if (!r.success) throw validationError(zodFieldErrors(r.error));
  return r.data;
}

export function parseQuery<S extends z.ZodType>(schema: S, query: unknown): z.output<S> {
  const r = schema.safeParse(query);
  if (!r.success) throw validationError(zodFieldErrors(r.error), 'Some query parameters are invalid');
  return r.data;
}

/** A path id; anything that is not a positive integer cannot name a row, hence 404. */
export function parseId(value: string | string[] | undefined, what: string): number {
  const r = idParamSchema.safeParse(value);
  if (!r.success) throw new AppError('not-found', `${what} not found`, 404);
  return r.data;
}
