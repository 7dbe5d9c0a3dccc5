/**
 * The synthetic bridge running inside the server process (the default rig of a demo): frames
 * paced by the wall clock at `speed` x real time, the same frames a remote bridge would send,
 * so the server's ingest treats both alike.
 */
import type { HelloFrame, SequencedFrame } from '../shared/protocol';
import { itemFrame } from './feed-items';
import { createSimulation, simulationTruth, type SimulationState } from './generator';
import type { SimulationProfile } from './profile';
import { simulatedSource } from './simulated-source';
import type { GroundTruth } from './truth';

export interface SimulatedFeedOptions {
  /** Multiple of real time (default 1). */
  speed?: number;
  /** Overrides profile.seed. */
  seed?: number;
  /** Samples per chunk = round(chunkMs * rate / 1000); default 40 ms. */
  chunkMs?: number;
  /** Default 'embedded'. */
  rigId?: string;
  /** Default a random id. */
  bridgeSessionId?: string;
  /** ISO time of sample 0; default the time of creation. */
  startTime?: string;
  /** Stop after this many seconds of data; default endless (runs repeat). */
  seconds?: number;
}

export interface SimulatedFeed {
  /** The HELLO this feed opens with. */
  readonly hello: HelloFrame;
  readonly samplesPerChunk: number;
  /** Samples produced so far. */
  readonly sampleCount: number;
  readonly running: boolean;
  /** True when a finite feed has produced all its samples. */
  readonly ended: boolean;
  /**
   * Starts the clock: frames are delivered to `onFrame` as their samples come due.
   * `onEnd` runs once when a finite feed has delivered everything.
   */
  start(onFrame: (frame: SequencedFrame) => void, onEnd?: () => void): void;
  /** Pauses the clock (start again to continue from where it stopped, on a fresh clock). */
  stop(): void;
  /** Produces the next chunk's frames at once, without the clock (tests, fast-forward). */
  step(): SequencedFrame[];
  /** Ground truth of everything produced so far. */
  truth(): GroundTruth;
}

/** Most catch-up work done in one timer tick (in chunks), so a stalled event loop recovers gently. */
const MAX_CHUNKS_PER_TICK = 200;

export function createSimulatedFeed(profile: SimulationProfile | unknown, opts: SimulatedFeedOptions = {}): SimulatedFeed {
  const speed = opts.speed ?? 1;
  if (!(speed > 0) || !Number.isFinite(speed)) throw new RangeError(`speed must be a positive number, got ${speed}`);
  const state: SimulationState = createSimulation(profile, { seed: opts.seed });
  const fs = state.sampleRateHz;
  const samplesPerChunk = Math.max(1, Math.round(((opts.chunkMs ?? 40) * fs) / 1000));
  const total = opts.seconds === undefined ? null : Math.round(opts.seconds * fs);
  const source = simulatedSource(state, total);
  const hello: HelloFrame = {
    type: 'hello', resumeFromSeq: 1, sampleRateHz: fs, rigId: opts.rigId ?? 'embedded',
    bridgeSessionId: opts.bridgeSessionId ?? randomId(), startTime: opts.startTime ?? new Date().toISOString(),
    channelNames: source.channelNames, units: source.units,
  };
  let seq = 0;
  let timer: ReturnType<typeof setTimeout> | null = null;
  let clock: { wallStartMs: number; sampleStart: number } | null = null;

  const ended = () => total !== null && state.nextSample >= total;
  /** Sample index at which the next chunk is complete. */
  const nextChunkEnd = () => (total === null ? state.nextSample + samplesPerChunk : Math.min(total, state.nextSample + samplesPerChunk));
  const step = (): SequencedFrame[] => source.read(samplesPerChunk).map((item) => itemFrame(item, ++seq));

  const feed: SimulatedFeed = {
    hello, samplesPerChunk,
    get sampleCount() { return state.nextSample; },
    get running() { return timer !== null; },
    get ended() { return ended(); },
    start(onFrame, onEnd) {
      if (timer) return;
      clock = { wallStartMs: Date.now(), sampleStart: state.nextSample };
      const tick = () => {
        const due = clock!.sampleStart + Math.floor(((Date.now() - clock!.wallStartMs) * speed * fs) / 1000);
        for (let k = 0; k < MAX_CHUNKS_PER_TICK && !ended() && nextChunkEnd() <= due; k++) {
          for (const f of step()) onFrame(f);
        }
        if (ended()) {
          timer = null;
          onEnd?.();
          return;
        }
        const nextDueMs = clock!.wallStartMs + ((nextChunkEnd() - clock!.sampleStart) * 1000) / (speed * fs);
        timer = setTimeout(tick, Math.max(0, nextDueMs - Date.now()));
      };
      timer = setTimeout(tick, 0);
    },
    stop() {
      if (timer) clearTimeout(timer);
      timer = null;
    },
    step,
    truth: () => simulationTruth(state),
  };
  return feed;
}

function randomId(): string {
  const bytes = new Uint8Array(16);
  globalThis.crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}
