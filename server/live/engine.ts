/**
 * The live engine: feeds (ingest) meet active pilot sessions. It answers ingest's hooks (header
 * checks, chunks, cues, gaps), runs each running session's pipeline, starts and stops the
 * embedded synthetic bridge of a demo rig, and keeps the session lifecycle (start, pause,
 * resume, stop) consistent between memory, sockets and the database.
 */
import type { SessionEvent, SessionEventKind } from '../../shared/api';
import type { ChunkFrame, CueFrame, GapFrame, HelloFrame } from '../../shared/protocol';
import type { AppContext } from '../context';
import type { StoreOp } from '../db/queries/feed';
import { maxLiveIds, updatePilotSession, unfinishedSessions } from '../db/queries/pilot-sessions';
import type { DecoderRow } from '../db/schema';
import { AppError } from '../errors';
import { EmbeddedBridges } from './embedded';
import { FeedIngest, type FeedHooks, type FeedState } from './ingest';
import type { LiveDecoder } from './live-decoder';
import type { LiveSession } from './live-session';
import { channelMap } from './samples';
import { SessionPipeline } from './session-pipeline';
import { LiveStore } from './store';

export interface EngineOptions {
  /** Builds the live decoder of a stored (frozen) decoder. */
  loadDecoder(row: DecoderRow): LiveDecoder;
  /** Multiple of real time for embedded bridges (default 1). */
  embeddedSpeed?: number;
}

/** Why a feed cannot serve a decoder (rate, missing channels), or null when it can. */
export function feedMismatch(decoder: LiveDecoder, header: Pick<HelloFrame, 'channelNames' | 'sampleRateHz'>): string | null {
  const parts: string[] = [];
  if (header.sampleRateHz !== decoder.sampleRateHz) {
    parts.push(`sampling rate ${header.sampleRateHz} Hz, decoder needs ${decoder.sampleRateHz} Hz`);
  }
  const { missing } = channelMap(header.channelNames, decoder.channelNames);
  if (missing.length > 0) {
    const shown = missing.slice(0, 6).join(', ');
    parts.push(`missing channel${missing.length > 1 ? 's' : ''} ${shown}${missing.length > 6 ? ` and ${missing.length - 6} more` : ''}`);
  }
  return parts.length === 0 ? null : `feed mismatch: ${parts.join('; ')}`;
}

const STATUS_INTERVAL_MS = 1000;

export class LiveEngine implements FeedHooks {
  readonly ingest: FeedIngest;
  readonly embedded: EmbeddedBridges;
  /** Active (ready, running, paused) sessions by id, and by rig. */
  readonly sessions = new Map<number, LiveSession>();
  private readonly byRig = new Map<number, LiveSession>();
  private ids: { trial: number; event: number };
  private readonly timer: ReturnType<typeof setInterval>;

  private constructor(private readonly ctx: AppContext, readonly store: LiveStore, readonly options: EngineOptions) {
    this.ids = maxLiveIds(ctx.db);
    this.ingest = new FeedIngest(ctx.db, store, this, ctx.log, ctx.now);
    this.embedded = new EmbeddedBridges(this.ingest, options.embeddedSpeed ?? 1);
    this.timer = setInterval(() => { for (const s of this.sessions.values()) if (s.hub.watched) s.broadcastStatus(); }, STATUS_INTERVAL_MS);
    this.timer.unref();
  }

  /**
   * Opens the live store (a worker thread for a database file, the main thread for ':memory:')
   * and closes sessions a previous server left running: their filter state is gone.
   */
  static create(ctx: AppContext, options: EngineOptions): LiveEngine {
    const store = ctx.config.dbFile === ':memory:' ? LiveStore.inThread(ctx.db.sqlite) : LiveStore.open(ctx.config.dbFile);
    const engine = new LiveEngine(ctx, store, options);
    for (const row of unfinishedSessions(ctx.db)) {
      updatePilotSession(ctx.db, row.id, { status: 'stopped', stoppedAt: ctx.now() });
      engine.event(row.id, 'stop', 'Stopped: the server restarted while the session ran', null)
        .catch((e: unknown) => ctx.log.error('storing a session event failed', e));
    }
    return engine;
  }

  allocTrialId(): number { return ++this.ids.trial; }

  /** Queues a session event, tells the session's console, resolves once it is stored. */
  event(sessionId: number, kind: SessionEventKind, text: string, sampleIndex: number | null): Promise<SessionEvent> {
    const id = ++this.ids.event;
    const atMs = this.ctx.now().getTime();
    const event: SessionEvent = { id, at: new Date(atMs).toISOString(), kind, text, sampleIndex };
    this.sessions.get(sessionId)?.hub.console({ type: 'event', event });
    return this.store.write([{ op: 'event', row: { id, sessionId, atMs, kind, text, sampleIndex } }]).then(() => event);
  }

  /** The environment a LiveSession runs in. */
  sessionEnv() {
    return {
      allocTrialId: () => this.allocTrialId(),
      event: (sessionId: number, kind: 'gap' | 'flag', text: string, sampleIndex: number | null) => {
        this.event(sessionId, kind, text, sampleIndex).catch((e: unknown) => this.ctx.log.error('storing a session event failed', e));
      },
      store: (op: StoreOp) => this.store.enqueue(op, (e) => { if (e) this.ctx.log.error('storing a live write failed', e); }),
      nowMs: () => this.ctx.now().getTime(),
    };
  }

  /** Makes `s` the active session of its rig (it must not have one). */
  register(s: LiveSession): void {
    this.sessions.set(s.id, s);
    this.byRig.set(s.identity.rigId, s);
    const feed = this.ingest.connectedFeed(s.identity.rigId);
    if (feed) s.feed = feed;
  }

  unregister(s: LiveSession): void {
    this.sessions.delete(s.id);
    if (this.byRig.get(s.identity.rigId) === s) this.byRig.delete(s.identity.rigId);
  }

  sessionOfRig(rigId: number): LiveSession | null { return this.byRig.get(rigId) ?? null; }

  /** Starts the pipeline of a ready session on its rig's feed (starting the embedded bridge first if the rig has one). */
  run(s: LiveSession, embeddedProfile: string | null): { feed: FeedState; startSample: number } {
    const rigId = s.identity.rigId;
    if (embeddedProfile && !this.ingest.connectedFeed(rigId)) {
      const hello = this.embedded.prepare(rigId, embeddedProfile, s.id);
      const why = feedMismatch(s.decoder, hello.header);
      if (why) throw new AppError('feed-mismatch', `The embedded bridge's ${why}`, 409);
      hello.connect();
    }
    const feed = this.ingest.connectedFeed(rigId);
    if (!feed) throw new AppError('feed-missing', 'No bridge is streaming for this rig: connect one, then start', 409);
    const why = feedMismatch(s.decoder, feed.header);
    if (why) throw new AppError('feed-mismatch', `The rig's ${why}`, 409);
    const { map } = channelMap(feed.header.channelNames, s.decoder.channelNames);
    const startSample = feed.nextSample;
    s.feed = feed;
    s.preview = null;
    s.pipeline = new SessionPipeline(s.decoder, feed.header.channelNames.length, map, startSample, s);
    return { feed, startSample };
  }

  /** Stops feeding a session (its pipeline is dropped) and the rig's embedded bridge, if any. */
  halt(s: LiveSession): number | null {
    const stopSample = s.pipeline?.nextSample ?? null;
    s.pipeline = null;
    s.preview = null;
    this.embedded.stop(s.identity.rigId);
    return stopSample;
  }

  async stop(): Promise<void> {
    clearInterval(this.timer);
    this.embedded.stopAll();
    await this.ingest.shutdown();
    await this.store.close();
  }

  // FeedHooks

  checkHeader(rigId: number, header: HelloFrame): string | null {
    const s = this.byRig.get(rigId);
    if (!s) return null;
    if (s.pipeline && s.feed && s.feed.header.bridgeSessionId !== header.bridgeSessionId) {
      return `session ${s.id} runs on another stream of this rig; stop it first`;
    }
    return feedMismatch(s.decoder, header);
  }

  connected(feed: FeedState): void {
    const s = this.byRig.get(feed.rigId);
    if (!s) return;
    if (!s.pipeline) s.feed = feed;
    s.broadcastStatus();
  }

  disconnected(feed: FeedState): void {
    const s = this.byRig.get(feed.rigId);
    if (!s || s.feed !== feed) return;
    if (s.pipeline) void this.event(s.id, 'flag', 'The feed disconnected; waiting for the bridge to resume', feed.nextSample);
    s.broadcastStatus();
  }

  private running(feed: FeedState): LiveSession | null {
    const s = this.byRig.get(feed.rigId);
    return s && s.pipeline && s.feed === feed ? s : null;
  }

  /**
   * A ready session's preview: while a console watches, its rig's feed runs through a pipeline of
   * its own (trace and quality only; cues give no trials), dropped at start, so the session's
   * filters still start at its first sample.
   */
  private preview(feed: FeedState, firstSample: number): SessionPipeline | null {
    const s = this.byRig.get(feed.rigId);
    if (!s || s.status !== 'ready' || s.feed !== feed || !s.hub.watched || feedMismatch(s.decoder, feed.header)) {
      if (s) s.preview = null;
      return null;
    }
    if (!s.preview || s.preview.nextSample !== firstSample) {
      const { map } = channelMap(feed.header.channelNames, s.decoder.channelNames);
      s.preview = new SessionPipeline(s.decoder, feed.header.channelNames.length, map, firstSample, s);
    }
    return s.preview;
  }

  chunk(feed: FeedState, f: ChunkFrame, arrivalNs: bigint, receivedNs: bigint): void {
    const s = this.running(feed);
    if (!s) { this.preview(feed, f.firstSample)?.chunk(f, arrivalNs, receivedNs); return; }
    const p = s.pipeline!;
    if (f.firstSample !== p.nextSample) {
      this.ctx.log.error(`session ${s.id}: chunk at ${f.firstSample}, expected ${p.nextSample}; skipped`);
      return;
    }
    p.chunk(f, arrivalNs, receivedNs);
  }

  cue(feed: FeedState, f: CueFrame, arrivalNs: bigint, receivedNs: bigint): void {
    const s = this.running(feed);
    if (!s) return;
    s.cueArrived(f.cueId, f.sample, f.label);
    s.pipeline!.cue(f.cueId, f.sample, f.label, s.status === 'paused', arrivalNs, receivedNs);
  }

  gap(feed: FeedState, fromSample: number, toSample: number, f: GapFrame, arrivalNs: bigint, receivedNs: bigint): void {
    const s = this.running(feed);
    if (!s) { this.preview(feed, fromSample)?.gap(fromSample, toSample, arrivalNs, receivedNs); return; }
    s.gapSeen(fromSample, toSample, f.reason === 'overflow' ? "the bridge's buffer overflowed" : 'lost at the source');
    s.pipeline!.gap(fromSample, toSample, arrivalNs, receivedNs);
  }
}

