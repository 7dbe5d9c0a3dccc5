import { createMemoryHistory, type Router } from 'vue-router';
import { permissionsFor, type Role } from '../../../shared/api/roles';
import { createAppRouter } from '../../../src/router';
import { useAuthStore } from '../../../src/stores/auth';

/** Mark `role` as signed in without a request (the auth store as after GET /api/auth/me). Needs an active pinia. */
export function signInAs(role: Role): void {
  const auth = useAuthStore();
  auth.me = { id: 1, email: `${role}@lab.test`, displayName: `Test ${role}`, role, permissions: permissionsFor(role) };
  auth.status = 'ready';
}

/** The app's router on in-memory history. */
export function memoryRouter(): Router {
  return createAppRouter(createMemoryHistory());
}
