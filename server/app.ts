/**
 * Builds the Express app (no listen): security headers, sessions in SQLite, CSRF, JSON bodies
 * up to 100 kB, passport, the /api routers, the built client, and the one error middleware.
 */
import { randomUUID } from 'node:crypto';
import express, { type Express, type RequestHandler } from 'express';
import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import session from 'express-session';
import type { AppContext } from './context';
import { AppError, apiNotFound, errorMiddleware } from './errors';
import { clientRouter } from './http/client';
import { requireCsrfToken } from './http/csrf';
import { createPassport } from './http/passport';
import { securityHeaders } from './http/security';
import { SqliteSessionStore } from './http/session-store';
import { auditRouter, outboxRouter } from './routes/admin';
import { authRouter } from './routes/auth';
import { decoderImportBodyParser, decodersRouter, studyDecodersRouter } from './routes/decoders';
import { healthRouter } from './routes/health';
import { participantsRouter } from './routes/participants';
import { recordingsRouter } from './routes/recordings';
import { rigsRouter } from './routes/rigs';
import { sessionsRouter } from './routes/sessions';
import { studiesRouter } from './routes/studies';
import { studyTrainingJobsRouter, trainingJobsRouter } from './routes/training-jobs';
import { usersRouter } from './routes/users';
import type { Services } from './services';

export const SESSION_COOKIE = 'aftercue.sid';
export const SESSION_MAX_AGE_MS = 12 * 3_600_000;
export const JSON_BODY_LIMIT = '100kb';

export interface BuiltApp {
  app: Express;
  /** The session middleware, for WebSocket upgrades that need the signed-in user. */
  sessionMiddleware: RequestHandler;
  sessionStore: SqliteSessionStore;
}

/**
 * Attempts per IP + e-mail address in the configured window. For sign-in only failures count (a lab
 * sharing one address must not lock itself out); reset requests always answer 202, so all count.
 */
function attemptLimiter(ctx: AppContext, countSuccesses: boolean): RequestHandler {
  return rateLimit({
    windowMs: ctx.config.loginRateLimit.windowMs,
    limit: ctx.config.loginRateLimit.max,
    skipSuccessfulRequests: !countSuccesses,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => {
      const body = req.body as { email?: unknown } | undefined;
      const email = typeof body?.email === 'string' ? body.email.trim().toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? '')}|${email}`;
    },
    handler: (_req, _res, next) => next(new AppError('rate-limited', 'Too many attempts; wait a few minutes and try again', 429)),
  });
}

export function buildApp(ctx: AppContext, services: Services): BuiltApp {
  const app = express();
  app.disable('x-powered-by');
  // Behind an HTTPS reverse proxy on the same host, trust its X-Forwarded-* for req.ip and secure cookies.
  if (ctx.config.secureCookies) app.set('trust proxy', 'loopback');

  app.use((_req, res, next) => {
    res.locals.requestId = randomUUID();
    res.setHeader('X-Request-Id', String(res.locals.requestId));
    next();
  });
  app.use(securityHeaders(ctx.config.secureCookies));

  const sessionStore = new SqliteSessionStore(ctx.db, SESSION_MAX_AGE_MS);
  const sessionMiddleware = session({
    name: SESSION_COOKIE,
    secret: ctx.config.sessionSecret,
    store: sessionStore,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: { httpOnly: true, sameSite: 'lax', secure: ctx.config.secureCookies, maxAge: SESSION_MAX_AGE_MS },
  });
  const passport = createPassport(services.auth);

  const api = express.Router();
  api.use((_req, res, next) => { res.setHeader('Cache-Control', 'no-store'); next(); });
  api.use(sessionMiddleware);
  api.use(requireCsrfToken);
  api.use(decoderImportBodyParser); // 20 MB for POST /studies/:studyId/decoders only
  api.use(express.json({ limit: JSON_BODY_LIMIT }));
  api.use(passport.initialize());
  api.use(passport.session());
  api.use('/health', healthRouter());
  api.use('/auth', authRouter(services.auth, passport, attemptLimiter(ctx, false), attemptLimiter(ctx, true)));
  api.use('/users', usersRouter(services.users));
  api.use('/rigs', rigsRouter(services.rigs));
  api.use('/audit', auditRouter(services.audit));
  api.use('/outbox', outboxRouter(services.outbox));
  api.use('/sessions', sessionsRouter(services.sessions));
  api.use('/studies/:studyId/participants', participantsRouter(services.participants));
  api.use('/studies/:studyId/recordings', recordingsRouter(services.recordings));
  api.use('/studies/:studyId/decoders', studyDecodersRouter(services.decoders));
  api.use('/studies/:studyId/training-jobs', studyTrainingJobsRouter(services.trainingJobs));
  api.use('/decoders', decodersRouter(services.decoders));
  api.use('/training-jobs', trainingJobsRouter(services.trainingJobs));
  api.use('/studies', studiesRouter(services.studies));
  api.use(apiNotFound);
  app.use('/api', api);

  const client = clientRouter(ctx.config.clientDir);
  if (client) app.use(client);
  app.use((_req, _res, next) => next(new AppError('not-found', 'Not found', 404)));

  app.use(errorMiddleware(ctx.log));
  return { app, sessionMiddleware, sessionStore };
}
