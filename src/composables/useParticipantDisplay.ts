import { onBeforeUnmount, onMounted, ref, shallowRef } from 'vue';
import { displayMessageSchema, LiveCloseCode, type DisplayMessage } from '@shared/api/live';
import { displaySocketUrl, openSocket, type SocketFactory } from '../api/live';

export type DisplayPhase = 'connecting' | 'ready' | 'cue' | 'feedback' | 'rest' | 'paused' | 'finished' | 'refused' | 'lost';

export type Feedback = Extract<DisplayMessage, { type: 'feedback' }>;

/**
 * The participant display's side of /ws/display/<token>: what to show now. The token is
 * one-time, so a dropped connection is not retried: the experimenter makes a new link.
 * After `restAfterMs` the feedback gives way to a fixation mark until the next cue.
 */
export function useParticipantDisplay(token: string, options: { socketFactory?: SocketFactory; restAfterMs?: number } = {}) {
  const factory = options.socketFactory ?? openSocket;
  const restAfterMs = options.restAfterMs ?? 3000;
  const phase = ref<DisplayPhase>('connecting');
  const classes = shallowRef<string[]>([]);
  const cueLabel = ref<string | null>(null);
  const feedback = shallowRef<Feedback | null>(null);
  let socket: WebSocket | null = null;
  let restTimer: ReturnType<typeof setTimeout> | null = null;
  let closing = false;

  function clearRest(): void {
    if (restTimer) clearTimeout(restTimer);
    restTimer = null;
  }

  function handle(msg: DisplayMessage): void {
    switch (msg.type) {
      case 'ready':
        classes.value = msg.classes;
        if (phase.value === 'connecting') phase.value = 'ready';
        break;
      case 'cue':
        clearRest();
        cueLabel.value = msg.classLabel;
        feedback.value = null;
        phase.value = 'cue';
        break;
      case 'feedback':
        feedback.value = msg;
        phase.value = 'feedback';
        clearRest();
        restTimer = setTimeout(() => {
          if (phase.value === 'feedback') phase.value = 'rest';
        }, restAfterMs);
        break;
      case 'state':
        if (msg.status === 'paused') phase.value = 'paused';
        else if (msg.status === 'stopped') phase.value = 'finished';
        else if (msg.status === 'running' && (phase.value === 'paused' || phase.value === 'connecting')) phase.value = 'ready';
        break;
    }
  }

  onMounted(() => {
    const ws = factory(displaySocketUrl(token));
    socket = ws;
    ws.onmessage = (ev: MessageEvent) => {
      if (typeof ev.data !== 'string') return;
      try {
        handle(displayMessageSchema.parse(JSON.parse(ev.data)));
      } catch {
        // unknown message: ignore
      }
    };
    ws.onclose = (ev: CloseEvent) => {
      if (closing || phase.value === 'finished') return;
      // 4403: the link is unknown, used or expired (shared/api/live.ts LiveCloseCode.forbidden).
      phase.value = ev.code === LiveCloseCode.forbidden || ev.code === LiveCloseCode.notFound ? 'refused' : 'lost';
    };
  });

  onBeforeUnmount(() => {
    closing = true;
    clearRest();
    socket?.close(1000, 'display closed');
  });

  return { phase, classes, cueLabel, feedback };
}
