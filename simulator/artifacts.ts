/**
 * Artifacts: blinks, horizontal saccades, muscle bursts, electrode pops and dropouts, each a
 * Poisson schedule on its own random stream, rendered chunk by chunk. Waveforms (ours, simple):
 * - blink: a sin^2 (Hann) bump of the drawn duration, positive at Fp1/Fp2, spread by the
 *   vertical-EOG pattern of head.ts (Cz gets 9.3 % of the EOG site, Corby & Kopell 1972);
 * - saccade: a step with 30 ms raised-cosine edges held for a fixation of 0.3-1.5 s, then back;
 *   opposite signs at F7 and F8 (horizontal EOG);
 * - muscle burst: white noise band-passed 20 Hz .. min(100 Hz, 0.4 fs) (two Butterworth
 *   biquads), Tukey-tapered, 0.3-2 s, over the left or right temporalis;
 * - pop: a step at one channel decaying exponentially (tau 0.1-0.5 s), lasting 6 tau;
 * - dropout: every channel reads 0 for the drawn duration (the amplifier delivered nothing).
 */
import {
  BLINK_SPREAD_DEG, electrodePoint, fromAngles, gaussianPattern, LEFT_CANTHUS, LEFT_TEMPORALIS, MUSCLE_SPREAD_DEG,
  RIGHT_CANTHUS, RIGHT_TEMPORALIS, SACCADE_SPREAD_DEG, type SpherePoint,
} from './head';
import { biquad, biquadProcess, type Biquad } from './processes';
import type { SimulationProfile } from './profile';
import { stream, uniform, type Rng } from './random';
import { PoissonSchedule, type Placement, type TimedEvent } from './schedule';
import { sparsify, type SparsePattern } from './sources';
import type { TruthArtifact, TruthDropout, TruthSource } from './truth';

export interface BlinkEvent extends TimedEvent { amplitudeUv: number }
export interface SaccadeEvent extends TimedEvent { amplitudeUv: number; edge: number; hold: number }
export interface MuscleEvent extends TimedEvent { amplitudeUv: number; side: 0 | 1 }
export interface PopEvent extends TimedEvent { amplitudeUv: number; channel: number; tau: number }
export type DropoutEvent = TimedEvent;

/** An artifact pattern source (for the truth file and for mixing). */
export interface PatternSource { truth: TruthSource; sparse: SparsePattern }

function patternSource(id: string, kind: TruthSource['kind'], at: SpherePoint, spreadDeg: number, pattern: Float64Array): PatternSource {
  return {
    truth: { id, kind, position: { x: at.x, y: at.y, z: at.z, thetaDeg: at.thetaDeg, phiDeg: at.phiDeg }, spreadDeg,
      pattern: Array.from(pattern), timeCourse: { type: 'artifact' }, effects: [] },
    sparse: sparsify(pattern),
  };
}

/** Muscle-burst band, Hz: 20 to min(100, 0.4 fs). */
export function muscleBand(sampleRateHz: number): [number, number] {
  return [20, Math.min(100, 0.4 * sampleRateHz)];
}

/** State of the artifact part of the generator. */
export class ArtifactGenerator {
  readonly blinks: PoissonSchedule<BlinkEvent>;
  readonly saccades: PoissonSchedule<SaccadeEvent>;
  readonly muscles: PoissonSchedule<MuscleEvent>;
  readonly pops: PoissonSchedule<PopEvent>;
  readonly dropouts: PoissonSchedule<DropoutEvent>;
  readonly blinkSource: PatternSource;
  readonly saccadeSource: PatternSource;
  readonly muscleSources: [PatternSource, PatternSource];
  private readonly muscleFilter: [Biquad, Biquad];
  private muscleUnitGain = 1;
  /** Live muscle bursts: event index -> its noise stream and filter memory. */
  private readonly muscleLive = new Map<number, { rng: Rng; state: Float64Array }>();
  private buf = new Float64Array(0);

  constructor(private readonly profile: SimulationProfile, private readonly seed: number,
              electrodes: SpherePoint[], popChannels: number[], still?: () => Placement) {
    const fs = profile.sampleRateHz;
    const a = profile.artifacts;
    const s = (t: number) => Math.max(1, Math.round(t * fs));

    const nz = fromAngles(112.5, 90);
    const fp = [electrodePoint('Fp1'), electrodePoint('Fp2')];
    const atFp = gaussianPattern(nz, fp, BLINK_SPREAD_DEG);
    const blinkNorm = (atFp[0]! + atFp[1]!) / 2;
    this.blinkSource = patternSource('eye-vertical', 'eye-vertical', nz, BLINK_SPREAD_DEG,
      gaussianPattern(nz, electrodes, BLINK_SPREAD_DEG).map((g) => g / blinkNorm));

    const hPattern = (pts: SpherePoint[]) => {
      const l = gaussianPattern(LEFT_CANTHUS, pts, SACCADE_SPREAD_DEG);
      const r = gaussianPattern(RIGHT_CANTHUS, pts, SACCADE_SPREAD_DEG);
      return l.map((g, i) => g - r[i]!);
    };
    const hNorm = hPattern([electrodePoint('F7')])[0]!;
    this.saccadeSource = patternSource('eye-horizontal', 'eye-horizontal', LEFT_CANTHUS, SACCADE_SPREAD_DEG,
      hPattern(electrodes).map((g) => g / hNorm));

    const muscle = (id: 'muscle-left' | 'muscle-right', at: SpherePoint, ref: string) => {
      const norm = gaussianPattern(at, [electrodePoint(ref)], MUSCLE_SPREAD_DEG)[0]!;
      return patternSource(id, id, at, MUSCLE_SPREAD_DEG, gaussianPattern(at, electrodes, MUSCLE_SPREAD_DEG).map((g) => g / norm));
    };
    this.muscleSources = [muscle('muscle-left', LEFT_TEMPORALIS, 'T7'), muscle('muscle-right', RIGHT_TEMPORALIS, 'T8')];
    const [lo, hi] = muscleBand(fs);
    this.muscleFilter = [biquad('highpass', lo, fs), biquad('lowpass', hi, fs)];
    this.calibrateMuscle();

    this.blinks = new PoissonSchedule(seed, 'blinks', a.blinksPerMin, fs, (index, start, rng) => {
      const amplitudeUv = uniform(rng, ...a.blinkAmplitudeUv);
      return { index, startSample: start, endSample: start + s(uniform(rng, ...a.blinkDurationS)), amplitudeUv };
    }, still?.());
    this.saccades = new PoissonSchedule(seed, 'saccades', a.saccadesPerMin, fs, (index, start, rng) => {
      const sign = rng.nextFloat() < 0.5 ? -1 : 1;
      const amplitudeUv = sign * uniform(rng, ...a.saccadeAmplitudeUv);
      const edge = s(0.03);
      const hold = s(uniform(rng, 0.3, 1.5));
      return { index, startSample: start, endSample: start + 2 * edge + hold, amplitudeUv, edge, hold };
    }, still?.());
    this.muscles = new PoissonSchedule(seed, 'muscle', a.muscleBurstsPerMin, fs, (index, start, rng) => {
      const side = rng.nextFloat() < 0.5 ? 0 : 1;
      const amplitudeUv = uniform(rng, ...a.muscleRmsUv);
      return { index, startSample: start, endSample: start + s(uniform(rng, 0.3, 2)), amplitudeUv, side };
    }, still?.());
    this.pops = new PoissonSchedule(seed, 'pops', popChannels.length > 0 ? a.popsPerMin : 0, fs, (index, start, rng) => {
      const channel = popChannels[rng.nextInt(popChannels.length)]!;
      const sign = rng.nextFloat() < 0.5 ? -1 : 1;
      const amplitudeUv = sign * uniform(rng, ...a.popAmplitudeUv);
      const tau = uniform(rng, 0.1, 0.5);
      return { index, startSample: start, endSample: start + s(6 * tau), amplitudeUv, channel, tau };
    });
    this.dropouts = new PoissonSchedule(seed, 'dropouts', a.dropoutsPerMin, fs, (index, start, rng) =>
      ({ index, startSample: start, endSample: start + s(uniform(rng, ...a.dropoutDurationS)) }));
  }

  /** Unit-RMS scaling of the muscle band-pass (sum of its squared impulse response). */
  private calibrateMuscle(): void {
    const n = Math.round(2 * this.profile.sampleRateHz);
    const h = new Float64Array(n);
    h[0] = 1;
    const st = new Float64Array(4);
    biquadProcess(this.muscleFilter[0], st, 0, h, 0, n);
    biquadProcess(this.muscleFilter[1], st, 2, h, 0, n);
    let e = 0;
    for (const v of h) e += v * v;
    this.muscleUnitGain = 1 / Math.sqrt(e);
  }

  private scratch(n: number): Float64Array {
    if (this.buf.length < n) this.buf = new Float64Array(n);
    this.buf.fill(0, 0, n);
    return this.buf;
  }

  /** Adds every artifact over samples [s0, s0 + n) to `out` ([channel][sample], µV). */
  render(out: Float64Array[], s0: number, n: number): void {
    const s1 = s0 + n;
    const buf = this.scratch(n);
    let any = false;
    for (const e of this.blinks.overlapping(s0, s1)) {
      any = true;
      const len = e.endSample - e.startSample;
      for (let t = Math.max(s0, e.startSample); t < Math.min(s1, e.endSample); t++) {
        const sn = Math.sin(Math.PI * (t - e.startSample) / len);
        buf[t - s0] = buf[t - s0]! + e.amplitudeUv * sn * sn;
      }
    }
    if (any) mix(out, this.blinkSource.sparse, buf, n);

    buf.fill(0, 0, n);
    any = false;
    for (const e of this.saccades.overlapping(s0, s1)) {
      any = true;
      for (let t = Math.max(s0, e.startSample); t < Math.min(s1, e.endSample); t++) {
        const k = t - e.startSample;
        let w = 1;
        if (k < e.edge) w = 0.5 - 0.5 * Math.cos(Math.PI * k / e.edge);
        else if (k >= e.edge + e.hold) w = 0.5 + 0.5 * Math.cos(Math.PI * (k - e.edge - e.hold) / e.edge);
        buf[t - s0] = buf[t - s0]! + e.amplitudeUv * w;
      }
    }
    if (any) mix(out, this.saccadeSource.sparse, buf, n);

    for (const e of this.muscles.overlapping(s0, s1)) this.renderMuscle(e, out, s0, n);

    for (const e of this.pops.overlapping(s0, s1)) {
      const row = out[e.channel]!;
      const k = 1 / (e.tau * this.profile.sampleRateHz);
      for (let t = Math.max(s0, e.startSample); t < Math.min(s1, e.endSample); t++) row[t - s0] = row[t - s0]! + e.amplitudeUv * Math.exp(-(t - e.startSample) * k);
    }
  }

  private renderMuscle(e: MuscleEvent, out: Float64Array[], s0: number, n: number): void {
    let live = this.muscleLive.get(e.index);
    if (!live) {
      live = { rng: stream(this.seed, 'muscle-noise', e.index), state: new Float64Array(4) };
      this.muscleLive.set(e.index, live);
    }
    const from = Math.max(s0, e.startSample);
    const to = Math.min(s0 + n, e.endSample);
    const buf = this.scratch(n);
    for (let t = from; t < to; t++) buf[t - s0] = live.rng.nextNormal();
    biquadProcess(this.muscleFilter[0], live.state, 0, buf, from - s0, to - s0);
    biquadProcess(this.muscleFilter[1], live.state, 2, buf, from - s0, to - s0);
    // Tukey taper: cosine ramps over the first and last 10 % of the burst.
    const len = e.endSample - e.startSample;
    const ramp = Math.max(1, Math.round(0.1 * len));
    const g = e.amplitudeUv * this.muscleUnitGain;
    for (let t = from; t < to; t++) {
      const k = t - e.startSample;
      const edge = Math.min(k, len - 1 - k);
      const w = edge >= ramp ? 1 : 0.5 - 0.5 * Math.cos(Math.PI * edge / ramp);
      buf[t - s0] = buf[t - s0]! * g * w;
    }
    mix(out, this.muscleSources[e.side].sparse, buf, n);
    if (to >= e.endSample) this.muscleLive.delete(e.index);
  }

  /** Sets every channel to 0 inside dropouts over [s0, s0 + n); returns the ranges, clipped. */
  applyDropouts(out: Float64Array[], s0: number, n: number): Array<[number, number]> {
    const ranges: Array<[number, number]> = [];
    for (const e of this.dropouts.overlapping(s0, s0 + n)) {
      const from = Math.max(s0, e.startSample);
      const to = Math.min(s0 + n, e.endSample);
      for (const row of out) row.fill(0, from - s0, to - s0);
      ranges.push([from, to]);
    }
    return ranges;
  }

  /** Artifacts and dropouts that start before `sampleCount`, for the truth file. */
  truth(sampleCount: number, channelNames: string[]): { artifacts: TruthArtifact[]; dropouts: TruthDropout[] } {
    const fs = this.profile.sampleRateHz;
    const base = (e: TimedEvent) => ({ startSample: e.startSample, endSample: e.endSample, startS: e.startSample / fs,
      durationS: (e.endSample - e.startSample) / fs });
    const before = <E extends TimedEvent>(events: E[]) => events.filter((e) => e.startSample < sampleCount);
    const artifacts: TruthArtifact[] = [
      ...before(this.blinks.events).map((e) => ({ kind: 'blink' as const, ...base(e), amplitudeUv: e.amplitudeUv, sourceId: 'eye-vertical' })),
      ...before(this.saccades.events).map((e) => ({ kind: 'saccade' as const, ...base(e), amplitudeUv: e.amplitudeUv, sourceId: 'eye-horizontal' })),
      ...before(this.muscles.events).map((e) => ({ kind: 'muscle' as const, ...base(e), amplitudeUv: e.amplitudeUv,
        sourceId: e.side === 0 ? 'muscle-left' : 'muscle-right' })),
      ...before(this.pops.events).map((e) => ({ kind: 'pop' as const, ...base(e), amplitudeUv: e.amplitudeUv,
        channel: channelNames[e.channel]!, tauS: e.tau })),
    ].sort((x, y) => x.startSample - y.startSample);
    return { artifacts, dropouts: before(this.dropouts.events).map(base) };
  }
}

/** out[c][i] += gain_c * x[i] over the pattern's channels. */
export function mix(out: Float64Array[], p: SparsePattern, x: Float64Array, n: number): void {
  for (let k = 0; k < p.channels.length; k++) {
    const row = out[p.channels[k]!]!;
    const g = p.gains[k]!;
    for (let i = 0; i < n; i++) row[i] = row[i]! + g * x[i]!;
  }
}
