/**
 * AppError and the one error middleware: every failure becomes
 * `{ "error": { "code", "message", "fields"? } }`. Unknown errors answer 500 with a generic
 * message and are logged with the request id, never with the request body or a stack to clients.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { zodFieldErrors, type ErrorCode, type FieldErrors } from '../shared/api';
import type { Logger } from './log';

/** An expected failure with its HTTP status and a stable code the client can branch on. */
export class AppError extends Error {
  constructor(readonly code: ErrorCode, message: string, readonly status: number, readonly fields?: FieldErrors) {
    super(message);
    this.name = 'AppError';
  }
}

/** 400 'validation' with per-field messages. */
export function validationError(fields: FieldErrors, message = 'Some fields need attention'): AppError {
  return new AppError('validation', message, 400, fields);
}

export function notFound(what: string): AppError {
  return new AppError('not-found', `${what} not found`, 404);
}

/** Body-parser errors carry a `type`; map the ones a client can cause. */
function fromBodyParser(err: unknown): AppError | null {
  if (typeof err !== 'object' || err === null) return null;
  if (!('type' in err)) return fromHttpError(err);
  switch ((err as { type: unknown }).type) {
    case 'entity.parse.failed': return new AppError('invalid-json', 'The request body is not valid JSON', 400);
    case 'entity.too.large': return new AppError('payload-too-large', 'The request body is too large', 413);
    case 'encoding.unsupported':
    case 'charset.unsupported': return new AppError('unsupported-encoding', 'Unsupported body encoding', 415);
    case 'request.aborted': return new AppError('aborted', 'The request was aborted', 400);
    default: return fromHttpError(err);
  }
}

/**
 * Other client errors from Express' own middleware (http-errors with a 4xx status), e.g. a missing
 * static file. Their messages may hold file paths, so the answer uses a generic one.
 */
function fromHttpError(err: object): AppError | null {
  const status = (err as { status?: unknown }).status;
  if (typeof status !== 'number' || !Number.isInteger(status) || status < 400 || status > 499) return null;
  return status === 404 ? new AppError('not-found', 'Not found', 404) : new AppError('bad-request', 'Bad request', status);
}

function toAppError(err: unknown): AppError | null {
  if (err instanceof AppError) return err;
  if (err instanceof ZodError) return validationError(zodFieldErrors(err));
  return fromBodyParser(err);
}

/** The last middleware of the app. */
export function errorMiddleware(log: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, next) => {
    if (res.headersSent) { next(err); return; }
    const known = toAppError(err);
    if (known) {
      res.status(known.status).json({ error: { code: known.code, message: known.message, ...(known.fields ? { fields: known.fields } : {}) } });
      return;
    }
    // Method and path only: bodies may hold passwords or tokens.
    log.error(`request ${String(res.locals.requestId)} ${req.method} ${req.path} failed`, err);
    res.status(500).json({ error: { code: 'internal', message: `Something went wrong (request ${String(res.locals.requestId)})` } });
  };
}

/** 404 JSON for any /api path no router answered. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError('not-found', `No API route ${req.method} ${req.originalUrl.split('?')[0]}`, 404));
};
