import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import { memoryRouter, signInAs } from '../helpers/signed-in';
import { fakeServer } from '../helpers/fake-server';
import { safeRedirect } from '../../../src/router';

describe('the router guard', () => {
  beforeEach(() => {
    setActivePinia(createPinia());
  });
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('sends a signed-out visitor to sign-in, remembering the page', async () => {
    // GET /api/auth/me answers 401 when signed out (API contract, shared/api/auth.ts).
    fakeServer({ 'GET /api/auth/me': { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in first' } } } });
    const router = memoryRouter();
    await router.push('/studies/4');
    expect(router.currentRoute.value.name).toBe('sign-in');
    expect(router.currentRoute.value.query.redirect).toBe('/studies/4');
  });

  it('lets a signed-out visitor read public pages', async () => {
    fakeServer({ 'GET /api/auth/me': { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in first' } } } });
    const router = memoryRouter();
    await router.push('/about');
    expect(router.currentRoute.value.name).toBe('about');
  });

  it('sends a reviewer to the forbidden page for user administration', async () => {
    signInAs('reviewer');
    const router = memoryRouter();
    await router.push('/admin/users');
    // shared/api/roles.ts: user:manage is admin only.
    expect(router.currentRoute.value.name).toBe('forbidden');
  });

  it('lets an investigator open a study', async () => {
    signInAs('investigator');
    const router = memoryRouter();
    await router.push('/studies/4');
    expect(router.currentRoute.value.name).toBe('study');
    expect(router.currentRoute.value.params.studyId).toBe('4');
  });

  it('sends a signed-in user away from the sign-in page', async () => {
    signInAs('experimenter');
    const router = memoryRouter();
    await router.push('/sign-in?redirect=/rigs');
    expect(router.currentRoute.value.fullPath).toBe('/rigs');
  });

  it('only redirects within the app after sign-in', () => {
    // Common practice (open-redirect guard): absolute and protocol-relative URLs are refused.
    expect(safeRedirect('/studies/2')).toBe('/studies/2');
    expect(safeRedirect('//evil.example/x')).toBe('/studies');
    expect(safeRedirect('https://evil.example/')).toBe('/studies');
    expect(safeRedirect(undefined)).toBe('/studies');
  });
});
