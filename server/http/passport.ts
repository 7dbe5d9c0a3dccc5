/**
 * passport with the local strategy (usernameField 'email'), one instance per app so several
 * servers can run in one process. Sessions hold the user id only; a disabled or deleted account
 * loses its sessions on the next request.
 */
import type { Request, Response } from 'express';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Actor } from '../context';
import { AppError } from '../errors';
import type { AuthService } from '../services/auth';

type Authenticator = InstanceType<typeof passport.Passport>;

export function createPassport(auth: AuthService): Authenticator {
  const p = new passport.Passport();
  p.use(new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: false }, (email, password, done) => {
    auth.verifyCredentials(email, password).then(
      (r) => (r.ok ? done(null, r.user) : done(null, false, { message: r.code })),
      (err: unknown) => done(err),
    );
  }));
  p.serializeUser((user, done) => done(null, user.id));
  p.deserializeUser((id: unknown, done) => {
    try { done(null, typeof id === 'number' ? auth.sessionUser(id) ?? false : false); } catch (err) { done(err); }
  });
  return p;
}

const FAILURES = {
  'invalid-credentials': () => new AppError('invalid-credentials', 'Wrong e-mail address or password', 401),
  'account-disabled': () => new AppError('account-disabled', 'This account is disabled; ask an admin', 403),
};

/** Runs the local strategy on the (already validated) body; resolves with the user or rejects with 401/403. */
export function authenticateLocal(p: Authenticator, req: Request, res: Response): Promise<Actor> {
  return new Promise((resolve, reject) => {
    p.authenticate('local', { session: false }, (err: unknown, user: Actor | false, info?: { message?: string }) => {
      if (err) reject(err);
      else if (user) resolve(user);
      else reject((info?.message === 'account-disabled' ? FAILURES['account-disabled'] : FAILURES['invalid-credentials'])());
    })(req, res, reject);
  });
}

/** Signs in on a regenerated session (new id against fixation), keeping the CSRF token. */
export function logIn(req: Request, user: Actor): Promise<void> {
  return new Promise((resolve, reject) => req.logIn(user, { session: true, keepSessionInfo: true }, (err) => (err ? reject(err) : resolve())));
}

/** Signs out and regenerates the session, keeping the CSRF token. */
export function logOut(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.logOut({ keepSessionInfo: true }, (err) => (err ? reject(err) : resolve())));
}
