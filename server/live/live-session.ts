/**
 * One active pilot session in memory: its decoder, its signal pipeline (while it runs), its
 * sockets, its running counts, and what a finished trial turns into: feedback on the participant
 * display first (the closed loop), then the trial on the console, then the stored row.
 */
import type { FeedState as ApiFeedState, SessionCounts, SessionStatus, SessionSummary, Trial, TrialFlag } from '../../shared/api';
import { LiveCloseCode, type QualityChannel } from '../../shared/api/live';
import type { StoreOp } from '../db/queries/feed';
import type { ArtifactLimits } from './artifact-limits';
import { SessionHub } from './hub';
import type { FeedState } from './ingest';
import type { LiveDecoder } from './live-decoder';
import type { PipelineSink, SessionPipeline, TrialDraft } from './session-pipeline';

/** What a live session needs from the engine around it. */
export interface SessionEnv {
  allocTrialId(): number;
  /** Queues a session event (kind, text, feed sample index). */
  event(sessionId: number, kind: 'gap' | 'flag', text: string, sampleIndex: number | null): void;
  store(op: StoreOp): void;
  nowMs(): number;
}

/** Names and ids a summary shows, fixed for the session's life. */
export type SessionIdentity = Omit<SessionSummary, 'status' | 'counts' | 'startedAt' | 'stoppedAt'>;

interface TrialState { id: number; trueClass: string | null; predictedClass: string; flags: TrialFlag[]; markedBad: boolean;
  trial: Trial }

const ms = (from: bigint, to: bigint): number => Number(to - from) / 1e6;

export class LiveSession implements PipelineSink {
  readonly hub = new SessionHub();
  status: SessionStatus;
  feed: FeedState | null = null;
  pipeline: SessionPipeline | null = null;
  /** Before start: the feed's trace and quality for the console (engine.ts); gives no trials. */
  preview: SessionPipeline | null = null;
  startedAtMs: number | null;
  stoppedAtMs: number | null;
  readonly counts: SessionCounts;
  private readonly trials = new Map<number, TrialState>();
  /** Latencies (totalMs) of this session's trials, in order. */
  readonly latenciesMs: number[] = [];

  constructor(readonly identity: SessionIdentity, readonly decoder: LiveDecoder, status: SessionStatus, counts: SessionCounts,
              startedAtMs: number | null, stoppedAtMs: number | null, private readonly env: SessionEnv) {
    this.status = status;
    this.counts = { ...counts };
    this.startedAtMs = startedAtMs;
    this.stoppedAtMs = stoppedAtMs;
  }

  get id(): number { return this.identity.id; }

  summary(): SessionSummary {
    return {
      ...this.identity, status: this.status, counts: { ...this.counts },
      startedAt: this.startedAtMs === null ? null : new Date(this.startedAtMs).toISOString(),
      stoppedAt: this.stoppedAtMs === null ? null : new Date(this.stoppedAtMs).toISOString(),
    };
  }

  feedState(): ApiFeedState {
    const f = this.feed;
    const start = this.pipeline?.startSample;
    return {
      connected: f?.connection != null,
      channelNames: f ? [...f.header.channelNames] : [],
      sampleRateHz: f ? f.header.sampleRateHz : null,
      samplesReceived: this.pipeline && start !== undefined ? this.pipeline.nextSample - start : 0,
      lagMs: f?.lagMs ?? null,
      lastSeq: f?.ackedSeq ?? 0,
    };
  }

  broadcastStatus(): void {
    this.hub.console({ type: 'status', session: { ...this.summary(), feed: this.feedState() } });
  }

  /** The session's own cue handling: console and display see the cue at once. */
  cueArrived(cueId: number, sampleIndex: number, label: string): void {
    this.hub.console({ type: 'cue', cueId, sampleIndex, classLabel: label === '' ? null : label });
    if (this.status === 'running') this.hub.display({ type: 'cue', cueId, classLabel: label });
  }

  // PipelineSink

  trial(d: TrialDraft): void {
    if (!this.pipeline) return;
    const classes = this.decoder.classes;
    const trueClass = d.trueIndex === null ? null : classes[d.trueIndex]!;
    const predictedClass = classes[d.predictedIndex]!;
    const probability = d.probabilities[d.predictedIndex]!;
    const correct = trueClass === null ? null : trueClass === predictedClass;
    // The closed loop: the participant's feedback goes out before anything else.
    if (this.status === 'running' && !d.flags.includes('paused')) {
      this.hub.display({ type: 'feedback', cueId: d.cueId, predictedClass, probability, correct });
    }
    const broadcastNs = process.hrtime.bigint();
    const s = d.stamps;
    const latency = {
      receivedMs: ms(s.arrivalNs, s.receivedNs), epochMs: ms(s.arrivalNs, s.epochNs), featuresMs: ms(s.arrivalNs, s.featuresNs),
      predictMs: ms(s.arrivalNs, s.predictNs), broadcastMs: ms(s.arrivalNs, broadcastNs), totalMs: ms(s.arrivalNs, broadcastNs),
    };
    const id = this.env.allocTrialId();
    const nowMs = this.env.nowMs();
    const start = this.pipeline?.startSample ?? 0;
    const trial: Trial = {
      id, cueId: d.cueId, sampleIndex: d.cueSample, onsetS: (d.cueSample - start) / this.decoder.sampleRateHz, trueClass,
      predictedClass, probability, probabilities: Array.from(d.probabilities), correct, latency, flags: d.flags,
      excluded: d.flags.length > 0, markedBad: false, note: null, createdAt: new Date(nowMs).toISOString(),
    };
    this.hub.console({ type: 'trial', trial });
    this.env.store({ op: 'trial', row: { id, sessionId: this.id, cueId: d.cueId, sampleIndex: d.cueSample, onsetS: trial.onsetS,
      trueClass, predictedClass, probabilities: trial.probabilities, latency, flags: d.flags, artifactChannels: d.artifactChannels,
      createdAtMs: nowMs } });
    this.trials.set(d.cueId, { id, trueClass, predictedClass, flags: d.flags, markedBad: false, trial });
    this.latenciesMs.push(latency.totalMs);
    this.counts.trials++;
    this.count(trueClass, predictedClass, d.flags, false, +1);
  }

  /** Adds (sign +1) or removes (-1) a trial's share of the flagged/scored/correct counts. */
  private count(trueClass: string | null, predicted: string, flags: readonly TrialFlag[], markedBad: boolean, sign: 1 | -1): void {
    if (flags.length > 0) this.counts.flagged += sign;
    if (markedBad) this.counts.markedBad += sign;
    if (flags.length > 0 || markedBad || trueClass === null) return;
    this.counts.scored += sign;
    if (trueClass === predicted) this.counts.correct += sign;
  }

  wantsDisplay(): boolean { return this.hub.watched; }

  display(bytes: Uint8Array): void { this.hub.displayFrame(bytes); }

  quality(channels: QualityChannel[]): void { this.hub.console({ type: 'quality', channels }); }

  limits(l: ArtifactLimits): void {
    if (!this.pipeline) return;
    this.env.store({ op: 'session-limits', sessionId: this.id, limits: {
      source: l.source, windows: l.windows, final: l.final, channelNames: [...this.decoder.channelNames],
      medianPeakToPeakUv: Array.from(l.medianPeakToPeakUv), madPeakToPeakUv: Array.from(l.madPeakToPeakUv),
      peakToPeakLimitUv: Array.from(l.peakToPeakLimitUv), rmsLimitUv: Array.from(l.rmsLimitUv) } });
    const what = l.final ? 'final' : 'provisional';
    this.env.event(this.id, 'flag', `Artifact limits ${what}: median + 5 MAD of peak-to-peak over ${l.windows} calibration windows ` +
      `(${l.source === 'decoder' ? "the decoder's calibration data" : "the session's first minute"})`, null);
  }

  rejudged(cueId: number, artifactChannels: string[]): void {
    if (!this.pipeline) return;
    const t = this.trials.get(cueId);
    if (!t || artifactChannels.length === 0) return;
    this.count(t.trueClass, t.predictedClass, t.flags, t.markedBad, -1);
    t.flags = [...t.flags, 'artifact'];
    this.count(t.trueClass, t.predictedClass, t.flags, t.markedBad, +1);
    t.trial = { ...t.trial, flags: t.flags, excluded: true };
    this.env.store({ op: 'trial-flags', id: t.id, flags: t.flags, artifactChannels });
    this.hub.console({ type: 'trial', trial: t.trial });
  }

  skippedCue(cueId: number, sample: number, reason: string): void {
    if (!this.pipeline) return;
    this.env.event(this.id, 'flag', `Cue ${cueId} gives no trial: ${reason}`, sample);
  }

  /** A trial was marked bad or good again through the API: keep the live counts right. */
  trialMarked(trialId: number, markedBad: boolean, note: string | null): void {
    for (const t of this.trials.values()) {
      if (t.id !== trialId) continue;
      if (t.markedBad !== markedBad) {
        this.count(t.trueClass, t.predictedClass, t.flags, t.markedBad, -1);
        t.markedBad = markedBad;
        this.count(t.trueClass, t.predictedClass, t.flags, t.markedBad, +1);
      }
      t.trial = { ...t.trial, markedBad, note, excluded: t.flags.length > 0 || markedBad };
      this.hub.console({ type: 'trial', trial: t.trial });
      return;
    }
  }

  /** Missing samples while the session runs. */
  gapSeen(fromSample: number, toSample: number, reason: string): void {
    if (toSample <= fromSample) return;
    this.counts.droppedSamples += toSample - fromSample;
    this.counts.gaps++;
    this.env.store({ op: 'session-gaps', sessionId: this.id, droppedSamples: this.counts.droppedSamples, gapCount: this.counts.gaps });
    this.env.event(this.id, 'gap', `${toSample - fromSample} samples missing (${reason})`, fromSample);
  }

  close(reason: string): void {
    this.hub.display({ type: 'state', status: this.status });
    this.hub.closeAll(LiveCloseCode.goingAway, reason);
  }
}
