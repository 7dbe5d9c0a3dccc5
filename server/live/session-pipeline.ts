/**
 * One running session's signal path, free of I/O: raw feed chunks in (from the session's first
 * sample on), filtered with carried state into a float64 ring, a trial out for every cue once
 * its epoch's last sample is in. Also the per-channel quality, the display stream and the
 * session-baseline artifact limits. Indices are feed sample indices; the ring counts from the
 * session's first sample.
 *
 * Latency accounting: every trial carries process.hrtime stamps taken from the arrival of the
 * message that completed its epoch (`arrivalNs`), through decoding (`receivedNs`), filtering and
 * epoch assembly, the feature stages, and the classifier. The engine adds the broadcast stamp.
 */
import type { QualityChannel } from '../../shared/api/live';
import type { TrialFlag } from '../../shared/api/sessions';
import type { ChunkFrame } from '../../shared/protocol';
import type { ChannelMajor } from '../../shared/types';
import { BASELINE_S, BaselineCollector, channelsBeyond, type ArtifactLimits } from './artifact-limits';
import { DisplayDecimator } from './display';
import type { LiveDecoder, LiveFilter } from './live-decoder';
import { QualityMeter } from './quality';
import { SampleRing } from './ring';
import { deinterleaveHold, fillHold } from './samples';

/** Largest block pushed through the filter at once when filling a long gap. */
const FILL_BLOCK = 4096;
/** Ring margin beyond the epoch for cue markers that arrive late, seconds. */
const LATE_CUE_MARGIN_S = 5;

export interface Stamps {
  arrivalNs: bigint;
  receivedNs: bigint;
  epochNs: bigint;
  featuresNs: bigint;
  predictNs: bigint;
}

export interface TrialDraft {
  cueId: number;
  cueSample: number;
  label: string;
  /** Index into the decoder's classes of the cue's label, or null. */
  trueIndex: number | null;
  probabilities: Float64Array;
  predictedIndex: number;
  flags: TrialFlag[];
  /** Names of channels beyond their artifact limit. */
  artifactChannels: string[];
  /** False while no artifact limits existed (judged later: `rejudged`). */
  judged: boolean;
  stamps: Stamps;
}

/** Where the pipeline's results go. */
export interface PipelineSink {
  trial(draft: TrialDraft): void;
  /** Whether anyone watches the display stream (skips the work when not). */
  wantsDisplay(): boolean;
  display(bytes: Uint8Array): void;
  quality(channels: QualityChannel[]): void;
  /** The session-baseline limits became usable (first time) or final. */
  limits(limits: ArtifactLimits): void;
  /** A trial predicted before limits existed, judged now; `artifactChannels` empty = clean. */
  rejudged(cueId: number, artifactChannels: string[]): void;
  /** A cue that gives no trial (its epoch starts before the session or is no longer held). */
  skippedCue(cueId: number, sample: number, reason: string): void;
}

interface PendingCue { cueId: number; sample: number; label: string; paused: boolean }

/** Sorted, merged [from, to) ranges of feed indices. */
class Ranges {
  readonly list: Array<[number, number]> = [];
  add(from: number, to: number): void {
    if (to <= from) return;
    const last = this.list[this.list.length - 1];
    if (last && from <= last[1]) last[1] = Math.max(last[1], to);
    else this.list.push([from, to]);
  }
  overlaps(from: number, to: number): boolean {
    for (let i = this.list.length - 1; i >= 0; i--) {
      const [a, b] = this.list[i]!;
      if (b <= from) return false;
      if (a < to) return true;
    }
    return false;
  }
}

export class SessionPipeline {
  readonly ring: SampleRing;
  private readonly filter: LiveFilter;
  private readonly map: Int32Array;
  private readonly last: Float64Array;
  private raw: ChannelMajor = [];
  private readonly gaps = new Ranges();
  private readonly dropouts = new Ranges();
  private readonly pending: PendingCue[] = [];
  private readonly unjudged: Array<{ cueId: number; pp: Float64Array }> = [];
  private readonly quality: QualityMeter;
  private readonly displayStream: DisplayDecimator;
  private displaying = false;
  private readonly baseline: BaselineCollector;
  private baselineNext = 0;
  private limitsNow: ArtifactLimits | null = null;
  private readonly pp: Float64Array;
  private readonly rms: Float64Array;
  /** The epoch being predicted (reused: predict reads it synchronously and keeps nothing). */
  private readonly epochBuf: ChannelMajor;

  constructor(readonly decoder: LiveDecoder, readonly feedChannelCount: number, channelIndex: Int32Array,
              readonly startSample: number, private readonly sink: PipelineSink, fixedLimits: ArtifactLimits | null = null) {
    const ch = decoder.channelNames.length;
    const fs = decoder.sampleRateHz;
    this.map = channelIndex;
    this.last = new Float64Array(ch);
    this.filter = decoder.createFilter();
    const { offset, length } = decoder.epoch;
    this.ring = new SampleRing(ch, length + Math.max(0, -offset) + Math.ceil(LATE_CUE_MARGIN_S * fs) + FILL_BLOCK);
    this.quality = new QualityMeter(decoder.channelNames, Math.max(1, Math.round(fs)));
    this.displayStream = new DisplayDecimator(ch, fs);
    this.baseline = new BaselineCollector(ch, length, Math.round(BASELINE_S * fs));
    this.pp = new Float64Array(ch);
    this.rms = new Float64Array(ch);
    this.epochBuf = Array.from({ length: ch }, () => new Float64Array(length));
    if (fixedLimits) {
      this.limitsNow = fixedLimits;
      this.baseline.finish();
    }
  }

  /** Feed index of the next sample expected. */
  get nextSample(): number { return this.startSample + this.ring.end; }
  get displayRateHz(): number { return this.displayStream.rateHz; }
  get artifactLimits(): ArtifactLimits | null { return this.limitsNow; }
  get gapRanges(): ReadonlyArray<readonly [number, number]> { return this.gaps.list; }

  /** A chunk whose first sample is `nextSample` (the acceptor guarantees the tiling). */
  chunk(f: ChunkFrame, arrivalNs: bigint, receivedNs: bigint): void {
    const n = f.sampleCount;
    const raw = this.rawBuffer(n);
    const bad = deinterleaveHold(f.samples, f.channelCount, n, this.map, raw, 0, this.last);
    if (bad > 0) this.dropouts.add(f.firstSample, f.firstSample + n);
    this.process(raw, n, arrivalNs, receivedNs);
  }

  /** Samples [from, to) will never arrive: held values keep the filter and the indices going. */
  gap(from: number, to: number, arrivalNs: bigint, receivedNs: bigint): void {
    this.gaps.add(from, to);
    for (let s = from; s < to; s += FILL_BLOCK) {
      const n = Math.min(FILL_BLOCK, to - s);
      const raw = this.rawBuffer(n);
      fillHold(raw, 0, n, this.last);
      this.process(raw, n, arrivalNs, receivedNs);
    }
  }

  /** A cue marker; `paused` = the session was paused when it came. */
  cue(cueId: number, sample: number, label: string, paused: boolean, arrivalNs: bigint, receivedNs: bigint): void {
    const start = sample + this.decoder.epoch.offset;
    if (start < this.startSample) {
      this.sink.skippedCue(cueId, sample, 'its epoch starts before the session did');
      return;
    }
    if (start - this.startSample < this.ring.start) {
      this.sink.skippedCue(cueId, sample, 'its marker came after its samples had left the buffer');
      return;
    }
    const entry = { cueId, sample, label, paused };
    let i = this.pending.length;
    while (i > 0 && this.pending[i - 1]!.sample > sample) i--;
    this.pending.splice(i, 0, entry);
    this.flushTrials(arrivalNs, receivedNs);
  }

  private rawBuffer(n: number): ChannelMajor {
    if (this.raw.length === 0 || this.raw[0]!.length !== n) {
      this.raw = Array.from({ length: this.decoder.channelNames.length }, () => new Float64Array(n));
    }
    return this.raw;
  }

  private process(raw: ChannelMajor, n: number, arrivalNs: bigint, receivedNs: bigint): void {
    if (n === 0) return;
    const feedIndex = this.nextSample;
    const y = this.filter.push(raw);
    this.ring.write(y, n);
    this.quality.add(raw, y, 0, n, this.limitsNow?.rmsLimitUv ?? null, (q) => this.sink.quality(q));
    const want = this.sink.wantsDisplay();
    if (want) this.displayStream.add(y, 0, n, feedIndex, (bytes) => this.sink.display(bytes));
    else if (this.displaying) this.displayStream.reset();
    this.displaying = want;
    this.collectBaseline();
    this.flushTrials(arrivalNs, receivedNs);
  }

  private collectBaseline(): void {
    if (this.baseline.finished) return;
    const len = this.baseline.windowSamples;
    const hop = Math.max(1, Math.floor(len / 2));
    let changed = false;
    while (this.baselineNext + len <= this.ring.end) {
      if (this.baselineNext + len > this.baseline.totalSamples) {
        this.baseline.finish();
        changed = true;
        break;
      }
      const from = this.startSample + this.baselineNext;
      if (!this.gaps.overlaps(from, from + len) && !this.dropouts.overlaps(from, from + len)) {
        this.ring.stats(this.baselineNext, len, this.pp, this.rms);
        this.baseline.add(this.pp, this.rms);
        changed = true;
      }
      this.baselineNext += hop;
    }
    if (!changed) return;
    const hadLimits = this.limitsNow !== null;
    const limits = this.baseline.limits();
    if (!limits) return;
    this.limitsNow = limits;
    if (!hadLimits || limits.final) this.sink.limits(limits);
    if (!hadLimits) {
      for (const u of this.unjudged) {
        this.sink.rejudged(u.cueId, channelsBeyond(u.pp, limits).map((c) => this.decoder.channelNames[c]!));
      }
      this.unjudged.length = 0;
    }
  }

  private flushTrials(arrivalNs: bigint, receivedNs: bigint): void {
    const { offset, length } = this.decoder.epoch;
    while (this.pending.length > 0) {
      const cue = this.pending[0]!;
      const from = cue.sample + offset - this.startSample;
      if (from + length > this.ring.end) return;
      this.pending.shift();
      if (!this.ring.holds(from, length)) {
        this.sink.skippedCue(cue.cueId, cue.sample, 'its samples had left the buffer');
        continue;
      }
      this.sink.trial(this.predict(cue, from, arrivalNs, receivedNs));
    }
  }

  private predict(cue: PendingCue, from: number, arrivalNs: bigint, receivedNs: bigint): TrialDraft {
    const { length } = this.decoder.epoch;
    const epoch = this.ring.read(from, length, this.epochBuf);
    const feedFrom = from + this.startSample;
    const flags: TrialFlag[] = [];
    if (this.gaps.overlaps(feedFrom, feedFrom + length)) flags.push('gap');
    if (this.dropouts.overlaps(feedFrom, feedFrom + length)) flags.push('dropout');
    if (cue.paused) flags.push('paused');
    this.ring.stats(from, length, this.pp, this.rms);
    const limits = this.limitsNow;
    const beyond = limits ? channelsBeyond(this.pp, limits).map((c) => this.decoder.channelNames[c]!) : [];
    if (beyond.length > 0) flags.push('artifact');
    if (!limits) this.unjudged.push({ cueId: cue.cueId, pp: Float64Array.from(this.pp) });
    const epochNs = process.hrtime.bigint();
    let featuresNs = epochNs;
    const probabilities = this.decoder.predictEpoch(epoch, () => { featuresNs = process.hrtime.bigint(); });
    const predictNs = process.hrtime.bigint();
    let predictedIndex = 0;
    for (let k = 1; k < probabilities.length; k++) if (probabilities[k]! > probabilities[predictedIndex]!) predictedIndex = k;
    const trueIndex = this.decoder.classes.indexOf(cue.label);
    return {
      cueId: cue.cueId, cueSample: cue.sample, label: cue.label, trueIndex: trueIndex >= 0 ? trueIndex : null,
      probabilities, predictedIndex, flags, artifactChannels: beyond, judged: limits !== null,
      stamps: { arrivalNs, receivedNs, epochNs, featuresNs, predictNs },
    };
  }
}
