/**
 * The synthetic bridge inside the server (simulator/embedded.ts) serving an embedded rig, such as
 * the seeded demo rig: its frames are encoded and handed to the same ingest code a WebSocket
 * bridge reaches, as one more connection of the rig. Each session gets its own seed (profile seed
 * + session id), so no two demo sessions see the same data.
 */
import { readFileSync } from 'node:fs';
import { encodeFrame, type HelloFrame } from '../../shared/protocol';
import { createSimulatedFeed, type SimulatedFeed } from '../../simulator/embedded';
import type { FeedConnection, FeedIngest } from './ingest';

/** Reads simulator/profiles/<name>.json. */
export function loadProfile(name: string): Record<string, unknown> {
  if (!/^[a-z0-9-]+$/.test(name)) throw new RangeError(`not a profile name: '${name}'`);
  return JSON.parse(readFileSync(new URL(`../../simulator/profiles/${name}.json`, import.meta.url), 'utf8')) as Record<string, unknown>;
}

export class EmbeddedBridges {
  private readonly running = new Map<number, { feed: SimulatedFeed; conn: FeedConnection }>();

  /** Multiple of real time for feeds started from now on (tests and benchmarks raise it). */
  speed: number;

  constructor(private readonly ingest: FeedIngest, speed: number) {
    this.speed = speed;
  }

  /** A feed for the rig, not yet connected: check its header, then `connect()`. */
  prepare(rigId: number, profileName: string, sessionId: number): { header: HelloFrame; connect(): void } {
    const profile = loadProfile(profileName);
    const seed = (typeof profile.seed === 'number' ? profile.seed : 0) + sessionId;
    const feed = createSimulatedFeed(profile, { seed, speed: this.speed, rigId: `embedded-rig-${rigId}` });
    return {
      header: feed.hello,
      connect: () => {
        this.stop(rigId);
        const conn = this.ingest.connect(rigId, {
          // ACKs need no answer in-process: the frames were handed over synchronously.
          send: () => {},
          close: () => { feed.stop(); this.running.delete(rigId); },
          pause: () => feed.stop(),
          resume: () => feed.start((f) => conn.receive(encodeFrame(f))),
        });
        conn.receive(encodeFrame(feed.hello));
        if (conn.closed) return;
        this.running.set(rigId, { feed, conn });
        feed.start((f) => conn.receive(encodeFrame(f)));
      },
    };
  }

  has(rigId: number): boolean { return this.running.has(rigId); }

  stop(rigId: number): void {
    const r = this.running.get(rigId);
    if (!r) return;
    this.running.delete(rigId);
    r.feed.stop();
    r.conn.onClose();
  }

  stopAll(): void {
    for (const rigId of [...this.running.keys()]) this.stop(rigId);
  }
}
