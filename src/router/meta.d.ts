import 'vue-router';
import type { Permission } from '@shared/api/roles';

declare module 'vue-router' {
  interface RouteMeta {
    /** Shown in the browser tab as "<title> · Aftercue". */
    title: string;
    /** The permission a signed-in user needs; the server checks it again on every request. */
    permission?: Permission;
    /** Reachable while signed out (sign-in, password pages, about, error pages). */
    public?: boolean;
  }
}

export {};
