/** Authorisation middleware: 401 when signed out, 403 when the role lacks the permission. */
import type { Request, RequestHandler } from 'express';
import { can, type Permission } from '../../shared/api';
import type { Actor } from '../context';
import { AppError } from '../errors';

export const requireAuth: RequestHandler = (req, _res, next) => {
  next(req.user ? undefined : new AppError('unauthenticated', 'Sign in first', 401));
};

export function requirePermission(permission: Permission): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) next(new AppError('unauthenticated', 'Sign in first', 401));
    else if (!can(req.user.role, permission)) next(new AppError('forbidden', 'Your role does not allow this', 403));
    else next();
  };
}

/** The signed-in user; only call behind requireAuth / requirePermission. */
export function actor(req: Request): Actor {
  if (!req.user) throw new AppError('unauthenticated', 'Sign in first', 401);
  return req.user;
}
