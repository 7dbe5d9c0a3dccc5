import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import OutboxView from '../../../src/views/OutboxView.vue';
import { fakeServer, settle } from '../helpers/fake-server';
import { memoryRouter, signInAs } from '../helpers/signed-in';

describe('OutboxView attachments', () => {
  beforeEach(() => { setActivePinia(createPinia()); signInAs('admin'); });
  afterEach(() => { vi.unstubAllGlobals(); document.body.innerHTML = ''; });

  it('lists a message\'s attachments as download links', async () => {
    const summary = { id: 5, from: 'Aftercue <noreply@lab.test>', to: 'investigator@lab.test', subject: 'Gap review: session #7',
      receivedAt: '2026-01-05T11:00:00.000Z', transport: 'in-process' };
    fakeServer({
      'GET /api/outbox': { status: 200, body: [summary] },
      'GET /api/outbox/5': { status: 200, body: { ...summary, text: 'Hello', attachments: [
        { id: 9, fileName: 'session-7-gap-review.pdf', contentType: 'application/pdf', size: 6074 }] } },
    });
    const router = memoryRouter();
    await router.push('/about');
    const w = mount(OutboxView, { props: { mailId: 5 }, global: { plugins: [router] }, attachTo: document.body });
    await settle();
    const link = w.find('[data-test="mail-attachments"] a');
    // Source: shared/api/outbox.ts (GET /api/outbox/:mailId/attachments/:attachmentId downloads one attachment).
    expect(link.attributes('href')).toBe('/api/outbox/5/attachments/9');
    // Source: constructed: 6074 bytes rounds to 6 KB.
    expect(link.text()).toContain('session-7-gap-review.pdf');
    expect(link.text()).toContain('(6 KB)');
  });
});
