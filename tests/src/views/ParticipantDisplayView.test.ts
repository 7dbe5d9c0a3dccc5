import { afterEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import { expectClose } from '../../helpers/all-close';
import { fakeSockets } from '../helpers/live';

// The view opens its socket through src/api/live.ts openSocket; the test stands in for it.
const sockets = vi.hoisted(() => ({ factory: null as null | ((url: string) => WebSocket) }));
vi.mock('../../../src/api/live', async (importOriginal) => ({
  ...(await importOriginal<typeof import('../../../src/api/live')>()),
  openSocket: (url: string) => sockets.factory!(url),
}));

const fake = fakeSockets();
sockets.factory = fake.factory;
const { default: ParticipantDisplayView } = await import('../../../src/views/ParticipantDisplayView.vue');

function stage(): HTMLElement {
  return document.body.querySelector('[data-test="participant-display"]') as HTMLElement;
}

describe('ParticipantDisplayView', () => {
  afterEach(() => {
    document.body.innerHTML = '';
  });

  it('shows get ready, the cue, then the feedback toward the predicted side, then the end', async () => {
    const w = mount(ParticipantDisplayView, { props: { token: 'tok-1' }, attachTo: document.body });
    const socket = fake.opened[fake.opened.length - 1]!;
    // Contract: /ws/display/<token> (issue6-contract.md, WebSockets).
    expect(socket.url).toMatch(/\/ws\/display\/tok-1$/);
    socket.serverSend({ type: 'ready', classes: ['left-hand', 'right-hand'] });
    await w.vm.$nextTick();
    expect(stage().dataset.phase).toBe('ready');
    expect(stage().textContent).toContain('Get ready');

    socket.serverSend({ type: 'cue', cueId: 1, classLabel: 'left-hand' });
    await w.vm.$nextTick();
    expect(stage().dataset.phase).toBe('cue');
    expect(stage().textContent).toContain('Left hand');
    // A lateral class gets an arrow turned toward its side (src/components/cue-look.ts).
    expect(stage().querySelector('.stage__arrow')?.getAttribute('style')).toContain('rotate(180deg)');

    socket.serverSend({ type: 'feedback', cueId: 1, predictedClass: 'right-hand', probability: 0.8, correct: false });
    await w.vm.$nextTick();
    expect(stage().dataset.phase).toBe('feedback');
    const fill = stage().querySelector('.meter__fill') as HTMLElement;
    // p = 0.8 fills (0.8 - 0.5) / 0.5 = 60 % of the right half, i.e. 30 % of the track (ParticipantDisplayView fb).
    expect(fill.classList.contains('meter__fill--right')).toBe(true);
    expect(fill.style.width.endsWith('%')).toBe(true);
    expectClose(parseFloat(fill.style.width), 30, { atol: 1e-9 });
    expect(stage().textContent).toContain('Differs from the cue');

    socket.serverSend({ type: 'state', status: 'stopped' });
    socket.serverClose(4503, 'session stopped');
    await w.vm.$nextTick();
    expect(stage().dataset.phase).toBe('finished');
    w.unmount();
  });

  it('says the link cannot be used when the server refuses the token', async () => {
    const w = mount(ParticipantDisplayView, { props: { token: 'used' }, attachTo: document.body });
    // 4403: unknown, used or expired token (shared/api/live.ts LiveCloseCode.forbidden).
    fake.opened[fake.opened.length - 1]!.serverClose(4403, 'this display link is unknown, used or expired');
    await w.vm.$nextTick();
    expect(stage().dataset.phase).toBe('refused');
    expect(stage().textContent).toContain('cannot be used');
    w.unmount();
  });
});
