import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { LoginRequest, Me } from '@shared/api/auth';
import { can as roleCan, type Permission } from '@shared/api/roles';
import { getMe, login, logout } from '../api/auth';
import { toApiError, type ApiError } from '../api/http';

/**
 * Who is signed in and what they may do. The client only mirrors the server's permissions
 * (shared/api/roles) to hide what a role cannot use; the server checks every request again.
 */
export const useAuthStore = defineStore('auth', () => {
  const me = ref<Me | null>(null);
  const status = ref<'unknown' | 'loading' | 'ready'>('unknown');
  /** Set when the server could not tell us who is signed in (other than a plain 401). */
  const error = ref<ApiError | null>(null);
  let pending: Promise<void> | null = null;

  const signedIn = computed(() => me.value !== null);

  async function refresh(): Promise<void> {
    status.value = 'loading';
    try {
      me.value = await getMe();
      error.value = null;
    } catch (e) {
      const err = toApiError(e);
      me.value = null;
      error.value = err.status === 401 ? null : err;
    } finally {
      status.value = 'ready';
    }
  }

  /** Asks the server once per page load; later calls reuse the answer. */
  function ensureLoaded(): Promise<void> {
    if (status.value === 'ready') return Promise.resolve();
    pending ??= refresh().finally(() => {
      pending = null;
    });
    return pending;
  }

  async function signIn(credentials: LoginRequest): Promise<Me> {
    const user = await login(credentials);
    me.value = user;
    error.value = null;
    status.value = 'ready';
    return user;
  }

  async function signOut(): Promise<void> {
    try {
      await logout();
    } finally {
      forget();
    }
  }

  /** Drop the local identity (after sign-out, or when the server says the session ended). */
  function forget(): void {
    me.value = null;
    status.value = 'ready';
  }

  function can(permission: Permission): boolean {
    return roleCan(me.value?.role, permission);
  }

  return { me, status, error, signedIn, ensureLoaded, refresh, signIn, signOut, forget, can };
});
