import { describe, expect, it } from 'vitest';
import { ApiError } from '../../../src/api/http';
import { useLoadState } from '../../../src/composables/useLoadState';

describe('useLoadState', () => {
  it('is loading while the read runs and ready after it', async () => {
    const { status, error, track } = useLoadState();
    // common practice: a list shows its loading state only while the request is out.
    expect(status.value).toBe('idle');
    let finish: () => void = () => {};
    const running = track(() => new Promise<void>((resolve) => { finish = resolve; }));
    expect(status.value).toBe('loading');
    finish();
    await running;
    expect(status.value).toBe('ready');
    expect(error.value).toBeNull();
  });

  it('keeps the failure as ApiError and clears it on the next try', async () => {
    const { status, error, track } = useLoadState();
    await track(async () => {
      throw new ApiError('forbidden', 'Not allowed', 403);
    });
    // The error shape is the API contract of shared/api/errors.ts: code and message.
    expect(status.value).toBe('error');
    expect(error.value?.code).toBe('forbidden');
    // A plain Error (no response) becomes the client's 'network' ApiError (src/api/http.ts toApiError).
    await track(async () => {
      throw new Error('offline');
    });
    expect(error.value?.code).toBe('network');
    const retry = track(async () => {});
    // common practice: a new attempt does not keep showing the old failure.
    expect(error.value).toBeNull();
    await retry;
    expect(status.value).toBe('ready');
  });
});
