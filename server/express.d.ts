// Types that passport and express-session leave open.
import type { Actor } from './context';

declare global {
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends Actor {}
  }
}

declare module 'express-session' {
  interface SessionData {
    /** Per-session CSRF token (see server/http/csrf.ts). */
    csrfToken?: string;
  }
}

export {};
