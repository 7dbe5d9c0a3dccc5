/** /api/auth: CSRF token, sign-in/out, the signed-in user, password reset and set-password. */
import { Router, type RequestHandler } from 'express';
import { loginRequestSchema, passwordResetRequestSchema, setPasswordRequestSchema } from '../../shared/api';
import { csrfTokenFor } from '../http/csrf';
import { actor, requireAuth } from '../http/guards';
import { parseBody } from '../http/parse';
import { authenticateLocal, logIn, logOut, type createPassport } from '../http/passport';
import type { AuthService } from '../services/auth';

export function authRouter(svc: AuthService, passport: ReturnType<typeof createPassport>,
                           loginLimiter: RequestHandler, resetLimiter: RequestHandler): Router {
  const r = Router();

  r.get('/csrf', (req, res) => {
    res.json({ token: csrfTokenFor(req) });
  });

  r.post('/login', loginLimiter, async (req, res) => {
    req.body = parseBody(loginRequestSchema, req.body);
    const user = await authenticateLocal(passport, req, res);
    await logIn(req, user);
    res.json(svc.recordLogin(user));
  });

  r.post('/logout', async (req, res) => {
    if (req.user) svc.recordLogout(req.user);
    await logOut(req);
    res.status(204).end();
  });

  r.get('/me', requireAuth, (req, res) => {
    res.json(svc.me(actor(req)));
  });

  r.post('/password-reset', resetLimiter, async (req, res) => {
    const { email } = parseBody(passwordResetRequestSchema, req.body);
    await svc.requestPasswordReset(email);
    res.status(202).json({ status: 'accepted' });
  });

  r.post('/set-password', async (req, res) => {
    const { token, password } = parseBody(setPasswordRequestSchema, req.body);
    await svc.setPassword(token, password);
    res.status(204).end();
  });

  return r;
}
