/**
 * The role walk's table: every HTTP route of the API, who may call it, and a sample request.
 * Later features add rows here; the walk test fails when the app has a route the table lacks.
 *
 * Sample bodies are deliberately empty or name rows that do not exist, so an allowed caller
 * gets a 400/404 and the walk changes nothing; what is checked is only 401 / 403 / neither.
 */
import type { Express } from 'express';
import type { Role } from '../../../shared/api';
import { SESSION_ROUTES } from './live-routes';

/** 'public': anyone; 'signed-in': any role; or the exact roles allowed. */
export type Access = 'public' | 'signed-in' | readonly Role[];

export interface RouteCase {
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** The Express pattern as registered, e.g. /api/studies/:studyId */
  pattern: string;
  /** A concrete path with sample ids (and query). */
  sample: string;
  body?: unknown;
  access: Access;
  /** The call ends the caller's session (the walk signs in again afterwards). */
  endsSession?: boolean;
}

const ALL: readonly Role[] = ['admin', 'investigator', 'experimenter', 'reviewer'];
const ADMIN: readonly Role[] = ['admin'];
const STUDY_OWNERS: readonly Role[] = ['admin', 'investigator'];
const RECORDING_STAFF: readonly Role[] = ['admin', 'investigator', 'experimenter'];
const STUDY_OWNERS_AND_RUNNERS: readonly Role[] = ['admin', 'investigator', 'experimenter'];

// Sources for "allowed roles": the foundation issue's permission list (study:read all;
// study:create/edit/archive investigator+admin; participant:* investigator+experimenter+admin;
// rig:read admin+investigator+experimenter; rig:manage, user:manage, audit:read, outbox:read admin).
export const ROUTES: readonly RouteCase[] = [
  { method: 'GET', pattern: '/api/health', sample: '/api/health', access: 'public' },
  { method: 'GET', pattern: '/api/auth/csrf', sample: '/api/auth/csrf', access: 'public' },
  { method: 'POST', pattern: '/api/auth/login', sample: '/api/auth/login', body: {}, access: 'public' },
  { method: 'POST', pattern: '/api/auth/logout', sample: '/api/auth/logout', access: 'public', endsSession: true },
  { method: 'GET', pattern: '/api/auth/me', sample: '/api/auth/me', access: 'signed-in' },
  { method: 'POST', pattern: '/api/auth/password-reset', sample: '/api/auth/password-reset', body: {}, access: 'public' },
  { method: 'POST', pattern: '/api/auth/set-password', sample: '/api/auth/set-password', body: {}, access: 'public' },

  { method: 'GET', pattern: '/api/users', sample: '/api/users', access: ADMIN },
  { method: 'POST', pattern: '/api/users/invitations', sample: '/api/users/invitations', body: {}, access: ADMIN },
  { method: 'PATCH', pattern: '/api/users/:userId', sample: '/api/users/4', body: {}, access: ADMIN },

  { method: 'GET', pattern: '/api/rigs', sample: '/api/rigs', access: RECORDING_STAFF },
  { method: 'POST', pattern: '/api/rigs', sample: '/api/rigs', body: {}, access: ADMIN },
  { method: 'PATCH', pattern: '/api/rigs/:rigId', sample: '/api/rigs/1', body: {}, access: ADMIN },

  { method: 'GET', pattern: '/api/audit', sample: '/api/audit?limit=5&offset=0', access: ADMIN },
  { method: 'GET', pattern: '/api/outbox', sample: '/api/outbox', access: ADMIN },
  { method: 'GET', pattern: '/api/outbox/:mailId', sample: '/api/outbox/999', access: ADMIN },
  { method: 'GET', pattern: '/api/outbox/:mailId/attachments/:attachmentId', sample: '/api/outbox/999/attachments/1', access: ADMIN },

  { method: 'GET', pattern: '/api/studies', sample: '/api/studies?includeArchived=true', access: ALL },
  { method: 'POST', pattern: '/api/studies', sample: '/api/studies', body: {}, access: STUDY_OWNERS },
  { method: 'GET', pattern: '/api/studies/:studyId', sample: '/api/studies/1', access: ALL },
  { method: 'PATCH', pattern: '/api/studies/:studyId', sample: '/api/studies/1', body: {}, access: STUDY_OWNERS },
  { method: 'POST', pattern: '/api/studies/:studyId/archive', sample: '/api/studies/999/archive', access: STUDY_OWNERS },

  { method: 'GET', pattern: '/api/studies/:studyId/participants', sample: '/api/studies/1/participants', access: ALL },
  { method: 'POST', pattern: '/api/studies/:studyId/participants', sample: '/api/studies/1/participants', body: {}, access: RECORDING_STAFF },
  { method: 'PATCH', pattern: '/api/studies/:studyId/participants/:participantId', sample: '/api/studies/1/participants/1', body: {},
    access: RECORDING_STAFF },
  ...SESSION_ROUTES,
  // Gap review: session:read (every role) reads it.
  { method: 'GET', pattern: '/api/sessions/:sessionId/review', sample: '/api/sessions/999/review', access: ALL },
  { method: 'GET', pattern: '/api/sessions/:sessionId/review.pdf', sample: '/api/sessions/999/review.pdf', access: ALL },
  // Mailing the review: session:run (investigator, experimenter, admin).
  { method: 'POST', pattern: '/api/sessions/:sessionId/review/mail', sample: '/api/sessions/999/review/mail', access: STUDY_OWNERS_AND_RUNNERS },

  // Issue 6 contract: decoder:read, study:read all; decoder:import, recording:upload, training:run investigator+experimenter+admin;
  // decoder:freeze investigator+admin.
  { method: 'GET', pattern: '/api/studies/:studyId/recordings', sample: '/api/studies/1/recordings', access: ALL },
  { method: 'POST', pattern: '/api/studies/:studyId/recordings', sample: '/api/studies/1/recordings', body: {}, access: RECORDING_STAFF },
  { method: 'POST', pattern: '/api/studies/:studyId/decoders', sample: '/api/studies/1/decoders', body: {}, access: RECORDING_STAFF },
  { method: 'POST', pattern: '/api/studies/:studyId/training-jobs', sample: '/api/studies/1/training-jobs', body: {},
    access: RECORDING_STAFF },
  { method: 'GET', pattern: '/api/decoders', sample: '/api/decoders?studyId=1', access: ALL },
  { method: 'GET', pattern: '/api/decoders/:decoderId', sample: '/api/decoders/999', access: ALL },
  { method: 'GET', pattern: '/api/decoders/:decoderId/artifact', sample: '/api/decoders/999/artifact', access: ALL },
  { method: 'POST', pattern: '/api/decoders/:decoderId/freeze', sample: '/api/decoders/999/freeze', access: STUDY_OWNERS },
  { method: 'GET', pattern: '/api/training-jobs', sample: '/api/training-jobs?studyId=1', access: ALL },
  { method: 'GET', pattern: '/api/training-jobs/:jobId', sample: '/api/training-jobs/999', access: ALL },
];

interface LayerLike {
  rawPath?: unknown;
  route?: { path: unknown; methods: Record<string, boolean> };
  handle?: { stack?: LayerLike[] };
}

function join(prefix: string, path: string): string {
  const joined = `${prefix}/${path}`.replace(/\/+/g, '/');
  return joined.length > 1 ? joined.replace(/\/$/, '') : joined;
}

function walk(stack: LayerLike[], prefix: string, out: string[]): void {
  for (const layer of stack) {
    if (layer.route) {
      if (typeof layer.route.path !== 'string') continue; // the client's history fallback is a RegExp
      for (const [method, on] of Object.entries(layer.route.methods)) {
        if (on && method !== '_all') out.push(`${method.toUpperCase()} ${join(prefix, layer.route.path)}`);
      }
    } else if (layer.handle?.stack) {
      const mount = typeof layer.rawPath === 'string' ? layer.rawPath : '';
      walk(layer.handle.stack, join(prefix, mount), out);
    }
  }
}

/** Every `METHOD /path` registered under /api, found by walking the Express router stacks. */
export function registeredApiRoutes(app: Express): string[] {
  const out: string[] = [];
  const router = (app as unknown as { router: { stack: LayerLike[] } }).router;
  walk(router.stack, '', out);
  return [...new Set(out.filter((r) => / \/api(\/|$)/.test(r)))].sort();
}
