import { ref, shallowRef } from 'vue';
import { toApiError, type ApiError } from '../api/http';

export type LoadStatus = 'idle' | 'loading' | 'ready' | 'error';

/**
 * Where one read from the server stands: `status` and the last failure. `track(fetch)` marks it
 * loading and clears the failure, awaits `fetch` (which keeps what it got), then marks it ready,
 * or error with the failure (as ApiError) when `fetch` throws.
 */
export function useLoadState() {
  const status = ref<LoadStatus>('idle');
  const error = shallowRef<ApiError | null>(null);

  async function track(fetch: () => Promise<void>): Promise<void> {
    status.value = 'loading';
    error.value = null;
    try {
      await fetch();
      status.value = 'ready';
    } catch (e) {
      error.value = toApiError(e);
      status.value = 'error';
    }
  }

  return { status, error, track };
}
