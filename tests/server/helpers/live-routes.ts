/**
 * Role-walk rows of the pilot-session API (issue 6 contract: session:read for every role;
 * session:run for investigator, experimenter and admin). Samples name a session that does not
 * exist or carry an empty body, so an allowed caller gets 400/404 and nothing changes.
 */
import type { Role } from '../../../shared/api';
import type { RouteCase } from './routes';

const ALL: readonly Role[] = ['admin', 'investigator', 'experimenter', 'reviewer'];
const RUN: readonly Role[] = ['admin', 'investigator', 'experimenter'];

export const SESSION_ROUTES: readonly RouteCase[] = [
  { method: 'GET', pattern: '/api/sessions', sample: '/api/sessions', access: ALL },
  { method: 'POST', pattern: '/api/sessions', sample: '/api/sessions', body: {}, access: RUN },
  { method: 'GET', pattern: '/api/sessions/:sessionId', sample: '/api/sessions/999', access: ALL },
  { method: 'POST', pattern: '/api/sessions/:sessionId/start', sample: '/api/sessions/999/start', access: RUN },
  { method: 'POST', pattern: '/api/sessions/:sessionId/pause', sample: '/api/sessions/999/pause', access: RUN },
  { method: 'POST', pattern: '/api/sessions/:sessionId/resume', sample: '/api/sessions/999/resume', access: RUN },
  { method: 'POST', pattern: '/api/sessions/:sessionId/stop', sample: '/api/sessions/999/stop', access: RUN },
  { method: 'POST', pattern: '/api/sessions/:sessionId/annotations', sample: '/api/sessions/999/annotations', body: {}, access: RUN },
  { method: 'GET', pattern: '/api/sessions/:sessionId/events', sample: '/api/sessions/999/events', access: ALL },
  { method: 'GET', pattern: '/api/sessions/:sessionId/trials', sample: '/api/sessions/999/trials', access: ALL },
  { method: 'GET', pattern: '/api/sessions/:sessionId/trials.csv', sample: '/api/sessions/999/trials.csv', access: ALL },
  { method: 'PATCH', pattern: '/api/sessions/:sessionId/trials/:trialId', sample: '/api/sessions/999/trials/1', body: {}, access: RUN },
  { method: 'POST', pattern: '/api/sessions/:sessionId/display-link', sample: '/api/sessions/999/display-link', access: RUN },
];
