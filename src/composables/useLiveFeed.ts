import { markRaw, onBeforeUnmount, ref, shallowRef, toValue, watch, type MaybeRefOrGetter } from 'vue';
import { consoleMessageSchema, decodeDisplayFrame, LiveCloseCode, type ConsoleMessage, type QualityChannel } from '@shared/api/live';
import { type SessionDetail, type SessionEvent, type Trial } from '@shared/api/sessions';
import { consoleSocketUrl, openSocket, type SocketFactory } from '../api/live';
import { listSessionEvents, listTrials } from '../api/sessions';
import { TraceRing } from './trace-ring';

/** A cue on the trace's time axis. */
export interface CueMark {
  cueId: number;
  timeS: number;
  classLabel: string | null;
}

/** What the trace chart reads each frame. Raw (never reactive): only `frame` tells it to redraw. */
export interface LiveTrace {
  channelNames: string[];
  displayRateHz: number;
  ring: TraceRing;
  /** Cues within the ring's time span, oldest first. */
  cues: CueMark[];
  /** Frames dropped because they did not parse or did not match the channel count. */
  badFrames: number;
}

export type LiveConnection = 'connecting' | 'open' | 'reconnecting' | 'refused' | 'closed';

export interface LiveFeedOptions {
  /** Seconds of trace held (the chart's scrolling window). */
  windowS?: number;
  socketFactory?: SocketFactory;
  /** Schedules the redraw bump; defaults to requestAnimationFrame. */
  requestFrame?: (cb: () => void) => unknown;
  reconnectDelayMs?: number;
}

/**
 * The server's refusals (shared/api/live.ts LiveCloseCode: bad request, not signed in, not
 * allowed, no such session): no reconnect. 4503 "going away" is not one: it follows a stop (the
 * status says so) or means the server is restarting or found this client too slow.
 */
function isRefusal(code: number): boolean {
  return code >= 4000 && code < 5000 && code !== LiveCloseCode.goingAway;
}

/** Insert or replace by id, keeping trial order by cue. */
function upsertById<T extends { id: number }>(list: readonly T[], row: T): T[] {
  const i = list.findIndex((x) => x.id === row.id);
  if (i < 0) return [...list, row];
  const next = list.slice();
  next[i] = row;
  return next;
}

function mergeById<T extends { id: number }>(base: readonly T[], extra: readonly T[]): T[] {
  let out = base.slice();
  for (const row of extra) out = upsertById(out, row);
  return out.sort((a, b) => a.id - b.id);
}

/**
 * The live feed of one pilot session over /ws/console: session state, trials, events, channel
 * quality, and the display samples in a preallocated ring. Binary frames only write into the
 * ring and bump `frame` at most once per animation frame; charts redraw on that bump.
 * Reconnects after a dropped connection (trials and events are re-read so none are missed);
 * closes on unmount.
 */
export function useLiveFeed(sessionId: MaybeRefOrGetter<number>, options: LiveFeedOptions = {}) {
  const windowS = options.windowS ?? 10;
  const factory = options.socketFactory ?? openSocket;
  const requestFrame = options.requestFrame ?? ((cb: () => void) => requestAnimationFrame(cb));
  const baseDelay = options.reconnectDelayMs ?? 1000;

  const connection = ref<LiveConnection>('connecting');
  const refusal = ref<string | null>(null);
  const session = shallowRef<SessionDetail | null>(null);
  const trials = shallowRef<Trial[]>([]);
  const events = shallowRef<SessionEvent[]>([]);
  const quality = shallowRef<QualityChannel[]>([]);
  const trace = shallowRef<LiveTrace | null>(null);
  const frame = ref(0);

  let socket: WebSocket | null = null;
  let stopped = false;
  let attempts = 0;
  let retryTimer: ReturnType<typeof setTimeout> | null = null;
  let bumpPending = false;

  function bump(): void {
    if (bumpPending) return;
    bumpPending = true;
    requestFrame(() => {
      bumpPending = false;
      frame.value++;
    });
  }

  /** Feed seconds of a feed sample index (cues and trials count feed samples). */
  function feedTimeS(sampleIndex: number): number {
    const rate = session.value?.feed.sampleRateHz;
    return rate ? sampleIndex / rate : NaN;
  }

  function onHello(msg: Extract<ConsoleMessage, { type: 'hello' }>): void {
    session.value = msg.session;
    const old = trace.value;
    const sameLayout = old && old.displayRateHz === msg.displayRateHz
      && old.channelNames.length === msg.channelNames.length && old.channelNames.every((n, i) => n === msg.channelNames[i]);
    if (!sameLayout && msg.channelNames.length > 0) {
      const capacity = Math.max(1, Math.ceil(windowS * msg.displayRateHz));
      trace.value = markRaw({
        channelNames: msg.channelNames.slice(), displayRateHz: msg.displayRateHz,
        ring: new TraceRing(msg.channelNames.length, capacity), cues: [], badFrames: 0,
      });
    }
    const id = toValue(sessionId);
    // What happened before this connection (a reload, a reconnect): read it once, merge by id.
    void Promise.all([listTrials(id), listSessionEvents(id)]).then(([t, e]) => {
      trials.value = mergeById(t, trials.value);
      events.value = mergeById(e, events.value);
    }).catch(() => { /* the live messages still arrive; the table fills from them */ });
    bump();
  }

  function onText(data: string): void {
    let msg: ConsoleMessage;
    try {
      msg = consoleMessageSchema.parse(JSON.parse(data));
    } catch {
      return; // an unknown message type from a newer server is ignored
    }
    switch (msg.type) {
      case 'hello': onHello(msg); break;
      case 'status':
        if (session.value) session.value = { ...session.value, ...msg.session };
        break;
      case 'quality': quality.value = msg.channels; break;
      case 'cue': {
        const t = trace.value;
        if (t) {
          t.cues.push({ cueId: msg.cueId, timeS: feedTimeS(msg.sampleIndex), classLabel: msg.classLabel });
          const oldest = t.ring.lastTimeS - windowS;
          while (t.cues.length > 0 && t.cues[0]!.timeS < oldest) t.cues.shift();
          bump();
        }
        break;
      }
      case 'trial': trials.value = upsertById(trials.value, msg.trial); break;
      case 'event': events.value = upsertById(events.value, msg.event); break;
    }
  }

  function onBinary(buffer: ArrayBuffer): void {
    const t = trace.value;
    if (!t) return;
    try {
      const f = decodeDisplayFrame(buffer);
      if (f.channels !== t.channelNames.length) throw new Error('channel count differs from hello');
      // firstSampleIndex counts feed samples (shared/api/live.ts); later samples follow at the display rate.
      const feedRate = session.value?.feed.sampleRateHz ?? f.sampleRateHz;
      t.ring.write(f.data, f.samples, f.firstSampleIndex / feedRate, 1 / f.sampleRateHz);
      bump();
    } catch {
      t.badFrames++;
    }
  }

  function connect(): void {
    if (stopped) return;
    const ws = factory(consoleSocketUrl(toValue(sessionId)));
    ws.binaryType = 'arraybuffer';
    socket = ws;
    ws.onopen = () => {
      attempts = 0;
      connection.value = 'open';
    };
    ws.onmessage = (ev: MessageEvent) => {
      if (typeof ev.data === 'string') onText(ev.data);
      else if (ev.data instanceof ArrayBuffer) onBinary(ev.data);
    };
    ws.onclose = (ev: CloseEvent) => {
      if (socket !== ws) return;
      socket = null;
      if (stopped) return;
      if (isRefusal(ev.code)) {
        connection.value = 'refused';
        refusal.value = ev.reason || `The server refused the console (code ${ev.code})`;
        return;
      }
      // A stopped session sends nothing more: keep what is on screen, do not reconnect.
      if (session.value?.status === 'stopped') {
        connection.value = 'closed';
        return;
      }
      connection.value = 'reconnecting';
      const delay = Math.min(10_000, baseDelay * 2 ** Math.min(attempts, 4));
      attempts++;
      retryTimer = setTimeout(connect, delay);
    };
  }

  function close(): void {
    stopped = true;
    if (retryTimer) clearTimeout(retryTimer);
    const ws = socket;
    socket = null;
    ws?.close(1000, 'console closed');
    connection.value = 'closed';
  }

  watch(() => toValue(sessionId), () => {
    if (socket) {
      const ws = socket;
      socket = null;
      ws.close(1000, 'session changed');
    }
    session.value = null;
    trials.value = [];
    events.value = [];
    trace.value = null;
    connection.value = 'connecting';
    connect();
  }, { immediate: true });

  onBeforeUnmount(close);

  return { connection, refusal, session, trials, events, quality, trace, frame };
}
