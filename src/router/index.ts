import { createRouter, createWebHistory, type Router, type RouterHistory } from 'vue-router';
import { useAuthStore } from '../stores/auth';
import { routes } from './routes';

/** Pages a signed-in user has no reason to see; they go to the studies list instead. */
const SIGNED_OUT_ONLY = new Set(['sign-in', 'forgot-password']);

/** Where to go after signing in: only same-app paths, never another origin. */
export function safeRedirect(value: unknown): string {
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') ? value : '/studies';
}

/**
 * The router with the app's one guard: signed out -> sign-in (remembering where the user was
 * going); signed in without the page's permission -> forbidden. The server remains the authority.
 */
export function createAppRouter(history: RouterHistory = createWebHistory(import.meta.env.BASE_URL)): Router {
  const router = createRouter({ history, routes, scrollBehavior: () => ({ top: 0 }) });

  router.beforeEach(async (to) => {
    const auth = useAuthStore();
    await auth.ensureLoaded();
    if (auth.me && typeof to.name === 'string' && SIGNED_OUT_ONLY.has(to.name)) return safeRedirect(to.query.redirect);
    if (to.meta.public) return true;
    if (!auth.me) return { name: 'sign-in', query: { redirect: to.fullPath } };
    if (to.meta.permission && !auth.can(to.meta.permission)) return { name: 'forbidden', query: { from: to.fullPath } };
    return true;
  });

  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Aftercue` : 'Aftercue';
  });

  return router;
}
