/**
 * SQL of the live path: the batched writer the live store runs (in its worker thread, or in the
 * main thread for an in-memory database) and the reads of a feed's stored samples and marks.
 * The writer uses prepared statements on a raw better-sqlite3 connection: it runs hundreds of
 * times a second.
 */
import type Database from 'better-sqlite3';
import { and, asc, eq, gte, lt } from 'drizzle-orm';
import type { TrialFlag, TrialLatency, SessionEventKind } from '../../../shared/api';
import { FEED_LIMITS } from '../../../shared/protocol';
import type { Db } from '../client';
import { feedChunks, feedMarks, feeds, type FeedRow } from '../schema';

/** One write of the live path. Times are ms since the epoch. */
export type StoreOp =
  /** `samples`: float32 little-endian interleaved [sample][channel]. */
  | { op: 'chunk'; feedId: number; seq: number; firstSample: number; sampleCount: number; channelCount: number; samples: Uint8Array }
  | { op: 'cue'; feedId: number; seq: number; sample: number; cueId: number; label: string; nextSample: number }
  | { op: 'gap'; feedId: number; seq: number; fromSample: number; toSample: number; reason: string }
  | { op: 'trial'; row: TrialInsert }
  | { op: 'trial-flags'; id: number; flags: TrialFlag[]; artifactChannels: string[] }
  | { op: 'event'; row: EventInsert }
  | { op: 'session-gaps'; sessionId: number; droppedSamples: number; gapCount: number }
  | { op: 'session-limits'; sessionId: number; limits: Record<string, unknown> };

export interface TrialInsert {
  id: number; sessionId: number; cueId: number; sampleIndex: number; onsetS: number; trueClass: string | null;
  predictedClass: string; probabilities: number[]; latency: TrialLatency; flags: TrialFlag[]; artifactChannels: string[];
  createdAtMs: number;
}

export interface EventInsert {
  id: number; sessionId: number; atMs: number; kind: SessionEventKind; text: string; sampleIndex: number | null;
}

/** Applies batches of StoreOps, one transaction per batch. */
export class LiveWriter {
  private readonly chunk: Database.Statement;
  private readonly mark: Database.Statement;
  private readonly progress: Database.Statement;
  private readonly trial: Database.Statement;
  private readonly trialFlags: Database.Statement;
  private readonly event: Database.Statement;
  private readonly gaps: Database.Statement;
  private readonly limits: Database.Statement;
  private readonly apply: (ops: readonly StoreOp[], nowMs: number) => void;

  constructor(sqlite: Database.Database) {
    this.chunk = sqlite.prepare(`INSERT OR IGNORE INTO feed_chunks (feed_id, seq, first_sample, sample_count, channel_count, samples)
      VALUES (?, ?, ?, ?, ?, ?)`);
    this.mark = sqlite.prepare(`INSERT OR IGNORE INTO feed_marks (feed_id, seq, kind, sample, to_sample, cue_id, label, reason)
      VALUES (?, ?, ?, ?, ?, ?, ?, ?)`);
    this.progress = sqlite.prepare('UPDATE feeds SET durable_seq = ?, next_sample = ?, last_seen_at = ? WHERE id = ? AND durable_seq < ?');
    this.trial = sqlite.prepare(`INSERT OR IGNORE INTO trials (id, session_id, cue_id, sample_index, onset_s, true_class, predicted_class,
      probabilities, latency, flags, artifact_channels, marked_bad, note, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 0, NULL, ?)`);
    this.trialFlags = sqlite.prepare('UPDATE trials SET flags = ?, artifact_channels = ? WHERE id = ?');
    this.event = sqlite.prepare('INSERT OR IGNORE INTO session_events (id, session_id, at, kind, text, sample_index) VALUES (?, ?, ?, ?, ?, ?)');
    this.gaps = sqlite.prepare('UPDATE pilot_sessions SET dropped_samples = ?, gap_count = ? WHERE id = ?');
    this.limits = sqlite.prepare('UPDATE pilot_sessions SET artifact_limits = ? WHERE id = ?');
    this.apply = sqlite.transaction((ops: readonly StoreOp[], nowMs: number) => {
      // Per feed, the last seq and next sample of this batch: one progress update each.
      const last = new Map<number, [number, number]>();
      for (const o of ops) this.one(o, last);
      for (const [feedId, [seq, next]] of last) this.progress.run(seq, next, nowMs, feedId, seq);
    });
  }

  /** Writes `ops` in one transaction (all or nothing). */
  write(ops: readonly StoreOp[], nowMs: number): void {
    this.apply(ops, nowMs);
  }

  private one(o: StoreOp, last: Map<number, [number, number]>): void {
    switch (o.op) {
      case 'chunk':
        this.chunk.run(o.feedId, o.seq, o.firstSample, o.sampleCount, o.channelCount,
          Buffer.from(o.samples.buffer, o.samples.byteOffset, o.samples.byteLength));
        last.set(o.feedId, [o.seq, o.firstSample + o.sampleCount]);
        return;
      case 'cue':
        this.mark.run(o.feedId, o.seq, 'cue', o.sample, null, o.cueId, o.label, null);
        last.set(o.feedId, [o.seq, o.nextSample]);
        return;
      case 'gap':
        this.mark.run(o.feedId, o.seq, 'gap', o.fromSample, o.toSample, null, null, o.reason);
        last.set(o.feedId, [o.seq, o.toSample]);
        return;
      case 'trial': {
        const r = o.row;
        this.trial.run(r.id, r.sessionId, r.cueId, r.sampleIndex, r.onsetS, r.trueClass, r.predictedClass, JSON.stringify(r.probabilities),
          JSON.stringify(r.latency), JSON.stringify(r.flags), JSON.stringify(r.artifactChannels), r.createdAtMs);
        return;
      }
      case 'trial-flags':
        this.trialFlags.run(JSON.stringify(o.flags), JSON.stringify(o.artifactChannels), o.id);
        return;
      case 'event':
        this.event.run(o.row.id, o.row.sessionId, o.row.atMs, o.row.kind, o.row.text, o.row.sampleIndex);
        return;
      case 'session-gaps':
        this.gaps.run(o.droppedSamples, o.gapCount, o.sessionId);
        return;
      case 'session-limits':
        this.limits.run(JSON.stringify(o.limits), o.sessionId);
        return;
    }
  }
}

/** The feed of a rig's bridge session, or undefined. */
export function findFeed(db: Db, rigId: number, bridgeSessionId: string): FeedRow | undefined {
  return db.orm.select().from(feeds).where(and(eq(feeds.rigId, rigId), eq(feeds.bridgeSessionId, bridgeSessionId))).get();
}

export function findFeedById(db: Db, feedId: number): FeedRow | undefined {
  return db.orm.select().from(feeds).where(eq(feeds.id, feedId)).get();
}

export function insertFeed(db: Db, f: { rigId: number; bridgeSessionId: string; channelNames: string[]; units: string[];
  sampleRateHz: number; startTime: string }, now: Date): FeedRow {
  return db.orm.insert(feeds).values({ ...f, createdAt: now, lastSeenAt: now }).returning().get();
}

export interface StoredChunk { seq: number; firstSample: number; sampleCount: number; channelCount: number; samples: Float32Array }

/** Chunks of a feed overlapping [fromSample, toSample), in sample order. */
export function readFeedChunks(db: Db, feedId: number, fromSample: number, toSample: number): StoredChunk[] {
  const rows = db.orm.select().from(feedChunks)
    .where(and(eq(feedChunks.feedId, feedId), lt(feedChunks.firstSample, toSample),
      gte(feedChunks.firstSample, fromSample - FEED_LIMITS.maxSamplesPerChunk)))
    .orderBy(asc(feedChunks.firstSample)).all();
  return rows.filter((r) => r.firstSample + r.sampleCount > fromSample).map((r) => {
    const b = r.samples;
    // Copy into an aligned buffer: a BLOB's bytes may start at any offset.
    const samples = new Float32Array(r.sampleCount * r.channelCount);
    new Uint8Array(samples.buffer).set(b.subarray(0, samples.byteLength));
    return { seq: r.seq, firstSample: r.firstSample, sampleCount: r.sampleCount, channelCount: r.channelCount, samples };
  });
}

/** Cue and gap marks of a feed with sample in [fromSample, toSample), in sample order. */
export function readFeedMarks(db: Db, feedId: number, fromSample: number, toSample: number) {
  return db.orm.select().from(feedMarks)
    .where(and(eq(feedMarks.feedId, feedId), gte(feedMarks.sample, fromSample), lt(feedMarks.sample, toSample)))
    .orderBy(asc(feedMarks.sample), asc(feedMarks.seq)).all();
}
