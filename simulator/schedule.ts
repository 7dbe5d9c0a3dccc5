/**
 * Event timing for the generator: the cue schedule (balanced, shuffled blocks of trials with
 * uniformly randomised inter-trial intervals) and Poisson artifact schedules. Schedules are
 * generated lazily, in time order, from their own random streams, so where a chunk boundary
 * falls never changes them.
 */
import type { SimulationProfile } from './profile';
import { exponential, stream, uniform, type Rng } from './random';

/** One cue of the schedule. */
export interface ScheduledCue {
  /** 1-based, in time order. */
  id: number;
  sample: number;
  timeS: number;
  label: string;
  classIndex: number;
  /** 0 for the first run of classes x trialsPerClass trials, 1 for the next, ... */
  block: number;
}

/**
 * Cue times: the first at `leadInS`, then each after an interval drawn uniformly from
 * `cueIntervalS`. Class order: each block holds every class `trialsPerClass` times, shuffled
 * (Fisher-Yates); blocks repeat for as long as the stream runs.
 */
export class CueSchedule {
  readonly cues: ScheduledCue[] = [];
  private readonly rng: Rng;
  private nextTimeS: number;
  private order: number[] = [];
  private block = -1;

  constructor(private readonly profile: SimulationProfile, seed: number) {
    this.rng = stream(seed, 'cues');
    this.nextTimeS = profile.leadInS;
  }

  /** Generates cues until one lies at or beyond `sample`. */
  ensureUntil(sample: number): void {
    const fs = this.profile.sampleRateHz;
    while (this.cues.length === 0 || this.cues[this.cues.length - 1]!.sample < sample) {
      if (this.order.length === 0) {
        this.block++;
        const { classes, trialsPerClass } = this.profile;
        const ordered = classes.flatMap((_, c) => new Array<number>(trialsPerClass).fill(c));
        this.order = this.rng.shuffle(ordered).reverse();
      }
      const classIndex = this.order.pop()!;
      const timeS = this.nextTimeS;
      this.cues.push({ id: this.cues.length + 1, sample: Math.round(timeS * fs), timeS, label: this.profile.classes[classIndex]!, classIndex, block: this.block });
      this.nextTimeS += uniform(this.rng, this.profile.cueIntervalS[0], this.profile.cueIntervalS[1]);
    }
  }
}

/**
 * Length of one run (the first block of classes x trialsPerClass cues): last cue + epoch end +
 * 1 s, in samples.
 */
export function runLengthSamples(profile: SimulationProfile, seed = profile.seed): number {
  const s = new CueSchedule(profile, seed);
  const n = profile.classes.length * profile.trialsPerClass;
  while (s.cues.length < n) s.ensureUntil(s.cues.length === 0 ? 0 : s.cues[s.cues.length - 1]!.sample + 1);
  const last = s.cues[n - 1]!;
  return Math.ceil((last.timeS + profile.epoch.tmaxS + 1) * profile.sampleRateHz);
}

/** A scheduled event occupying samples [startSample, endSample). */
export interface TimedEvent { index: number; startSample: number; endSample: number }

/**
 * Where an event of `length` samples drawn at `startSample` really starts (never earlier): see
 * `epochDeferral`.
 */
export type Placement = (startSample: number, length: number) => number;

/**
 * Placement for a participant who keeps still during trials: an event that would overlap the
 * epoch [cue + tmin, cue + tmax) of any cue starts at that epoch's end instead, and again at the
 * next epoch's end while it does not fit in the gap before that epoch. An event that finds no
 * gap long enough within MAX_DEFERRALS epochs keeps its drawn start (the participant could not
 * hold it). Events are only ever delayed, and in the order drawn.
 */
export function epochDeferral(cues: CueSchedule, profile: SimulationProfile): Placement {
  const fs = profile.sampleRateHz;
  const from = Math.round(profile.epoch.tminS * fs);
  const to = Math.round(profile.epoch.tmaxS * fs);
  let cursor = 0; // first cue whose epoch ends after the latest drawn start (starts come in order)
  return (start, length) => {
    cues.ensureUntil(start + length - from);
    while (cursor < cues.cues.length && cues.cues[cursor]!.sample + to <= start) cursor++;
    let s = start;
    for (let i = cursor, moves = 0; moves <= MAX_DEFERRALS; i++) {
      cues.ensureUntil(s + length - from);
      const c = cues.cues[i]!.sample;
      if (c + from >= s + length) return s;
      if (c + to > s) { s = c + to; moves++; }
    }
    return start;
  };
}

/** Epochs an event may be deferred past before it keeps its drawn start (`epochDeferral`). */
export const MAX_DEFERRALS = 20;

/**
 * Poisson events of one kind at `ratePerMin` (exponential intervals between onsets). Events of
 * one kind never overlap: an onset that would fall inside the previous event moves to its end.
 * `make` draws the event's own parameters from the kind's stream; `place`, when given, may then
 * delay the event (keeping its length), e.g. out of the trials' epochs (`epochDeferral`).
 */
export class PoissonSchedule<E extends TimedEvent> {
  readonly events: E[] = [];
  private readonly rng: Rng;
  private nextOnsetS: number;
  /** Index of the first event that may still overlap the next chunk. */
  firstActive = 0;

  constructor(seed: number, kind: string, private readonly ratePerMin: number, private readonly sampleRateHz: number,
              private readonly make: (index: number, startSample: number, rng: Rng) => E,
              private readonly place?: Placement) {
    this.rng = stream(seed, kind);
    this.nextOnsetS = ratePerMin > 0 ? exponential(this.rng, 60 / ratePerMin) : Infinity;
  }

  /** Generates events until one starts at or beyond `sample`. */
  ensureUntil(sample: number): void {
    while (Number.isFinite(this.nextOnsetS)) {
      const last = this.events[this.events.length - 1];
      if (last && last.startSample >= sample) return;
      let start = Math.round(this.nextOnsetS * this.sampleRateHz);
      if (last && start < last.endSample) start = last.endSample;
      const e = this.make(this.events.length, start, this.rng);
      const placed = this.place ? this.place(start, e.endSample - start) : start;
      this.events.push(placed === start ? e : { ...e, startSample: placed, endSample: e.endSample + placed - start });
      this.nextOnsetS += exponential(this.rng, 60 / this.ratePerMin);
    }
  }

  /** Events overlapping [from, to), in order; advances `firstActive` past finished ones. */
  *overlapping(from: number, to: number): Generator<E> {
    this.ensureUntil(to);
    while (this.firstActive < this.events.length && this.events[this.firstActive]!.endSample <= from) this.firstActive++;
    for (let i = this.firstActive; i < this.events.length; i++) {
      const e = this.events[i]!;
      if (e.startSample >= to) break;
      if (e.endSample > from) yield e;
    }
  }
}
