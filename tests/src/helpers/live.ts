import type { SessionDetail, Trial } from '../../../shared/api/sessions';

/** A minimal WebSocket stand-in: the test plays the server by calling serverSend / serverClose. */
export class FakeSocket {
  binaryType: BinaryType = 'blob';
  readyState = 0;
  onopen: ((ev: Event) => void) | null = null;
  onmessage: ((ev: MessageEvent) => void) | null = null;
  onclose: ((ev: CloseEvent) => void) | null = null;
  onerror: ((ev: Event) => void) | null = null;
  closedByClient: { code?: number; reason?: string } | null = null;

  constructor(readonly url: string) {}

  open(): void {
    this.readyState = 1;
    this.onopen?.(new Event('open'));
  }

  serverSend(data: string | ArrayBuffer | object): void {
    const payload = typeof data === 'string' || data instanceof ArrayBuffer ? data : JSON.stringify(data);
    this.onmessage?.({ data: payload } as MessageEvent);
  }

  serverClose(code: number, reason = ''): void {
    this.readyState = 3;
    this.onclose?.({ code, reason } as CloseEvent);
  }

  close(code?: number, reason?: string): void {
    this.closedByClient = { code, reason };
    this.readyState = 3;
  }
}

/** A factory that records every socket it opens. */
export function fakeSockets() {
  const opened: FakeSocket[] = [];
  const factory = (url: string) => {
    const s = new FakeSocket(url);
    opened.push(s);
    return s as unknown as WebSocket;
  };
  return { opened, factory };
}

/** A pilot session as GET /api/sessions/:id answers it (invented values for the client tests). */
export function sessionDetail(overrides: Partial<SessionDetail> = {}): SessionDetail {
  return {
    id: 7, studyId: 1, studyName: 'Hand imagery', participantId: 1, participantCode: 'P-001', rigId: 1, rigName: 'Demo rig',
    decoderId: 3, decoderName: 'Demo decoder', decoderSha256: 'ab'.repeat(32), status: 'running',
    createdAt: '2026-03-02T10:00:00.000Z', startedAt: '2026-03-02T10:01:00.000Z', stoppedAt: null,
    counts: { trials: 0, scored: 0, correct: 0, flagged: 0, markedBad: 0, droppedSamples: 0, gaps: 0 },
    feed: { connected: true, channelNames: ['C3', 'Cz', 'C4'], sampleRateHz: 500, samplesReceived: 0, lagMs: 12, lastSeq: 0 },
    offline: { cvAccuracy: 0.78, wilson95: [0.7, 0.84], chanceThreshold95: 0.6 },
    classes: ['left-hand', 'right-hand'], epochStartS: 0, epochEndS: 4, notes: '',
    ...overrides,
  };
}

let nextTrialId = 1;

/** A trial with a known outcome: correct true/false, or null for an unknown true class. */
export function trial(correct: boolean | null, overrides: Partial<Trial> = {}): Trial {
  const id = nextTrialId++;
  const trueClass = correct === null ? null : 'left-hand';
  const predictedClass = correct === false ? 'right-hand' : 'left-hand';
  return {
    id, cueId: id, sampleIndex: id * 2500, onsetS: id * 5, trueClass, predictedClass,
    probability: 0.7, probabilities: predictedClass === 'left-hand' ? [0.7, 0.3] : [0.3, 0.7], correct,
    latency: { receivedMs: 0.1, epochMs: 0.4, featuresMs: 1.5, predictMs: 1.7, broadcastMs: 1.9, totalMs: 2 },
    flags: [], excluded: false, markedBad: false, note: null, createdAt: '2026-03-02T10:02:00.000Z',
    ...overrides,
  };
}

/** `correct` correct and `n - correct` incorrect trials, correct ones first. */
export function trials(correct: number, n: number): Trial[] {
  return Array.from({ length: n }, (_, i) => trial(i < correct));
}
