/**
 * CSRF protection by a synchronizer token (OWASP CSRF Prevention Cheat Sheet): one random token
 * per session, returned by GET /api/auth/csrf and required in X-CSRF-Token on every unsafe
 * method. A cross-site page cannot read it, so it cannot forge a state-changing request.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { AppError } from '../errors';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
export const CSRF_HEADER = 'x-csrf-token';

/** The session's token, created on first use. */
export function csrfTokenFor(req: Request): string {
  req.session.csrfToken ??= randomBytes(32).toString('base64url');
  return req.session.csrfToken;
}

function sameToken(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/** Refuses unsafe methods whose X-CSRF-Token does not match the session's token: 403 'csrf'. */
export const requireCsrfToken: RequestHandler = (req, _res, next) => {
  if (SAFE_METHODS.has(req.method)) { next(); return; }
  const sent = req.get(CSRF_HEADER);
  const expected = req.session?.csrfToken;
  if (!sent || !expected || !sameToken(sent, expected)) {
    next(new AppError('csrf', 'Missing or invalid CSRF token; fetch /api/auth/csrf and retry', 403));
    return;
  }
  next();
};
