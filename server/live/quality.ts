/**
 * Per-channel signal quality over one-second blocks: RMS of the filtered signal, flat (raw
 * peak-to-peak below 0.1 µV) and saturated (clipping: at least 10 % of the raw samples sit
 * exactly at the block's maximum or minimum while the channel is not flat). Common practice,
 * not from a cited source: clipped amplifier channels repeat their rail value.
 */
import type { QualityChannel } from '../../shared/api/live';
import type { ChannelMajor } from '../../shared/types';

export const FLAT_UV = 0.1;
export const CLIP_FRACTION = 0.1;

export class QualityMeter {
  private readonly sumSq: Float64Array;
  private readonly lo: Float64Array;
  private readonly hi: Float64Array;
  private readonly atLo: Int32Array;
  private readonly atHi: Int32Array;
  private n = 0;

  constructor(readonly names: readonly string[], readonly blockSamples: number) {
    const c = names.length;
    this.sumSq = new Float64Array(c);
    this.lo = new Float64Array(c);
    this.hi = new Float64Array(c);
    this.atLo = new Int32Array(c);
    this.atHi = new Int32Array(c);
    this.reset();
  }

  private reset(): void {
    this.sumSq.fill(0);
    this.lo.fill(Infinity);
    this.hi.fill(-Infinity);
    this.atLo.fill(0);
    this.atHi.fill(0);
    this.n = 0;
  }

  /**
   * Adds samples [from, to) of a raw and a filtered chunk; calls `emit` each time a block is full.
   * @param rmsLimitUv per-channel RMS limits, or null while there are none
   */
  add(raw: ChannelMajor, filtered: ChannelMajor, from: number, to: number, rmsLimitUv: Float64Array | null,
      emit: (channels: QualityChannel[]) => void): void {
    let i = from;
    while (i < to) {
      const take = Math.min(to - i, this.blockSamples - this.n);
      for (let c = 0; c < this.names.length; c++) {
        const r = raw[c]!, f = filtered[c]!;
        let ss = this.sumSq[c]!, lo = this.lo[c]!, hi = this.hi[c]!, nLo = this.atLo[c]!, nHi = this.atHi[c]!;
        for (let k = i; k < i + take; k++) {
          const y = f[k]!;
          ss += y * y;
          const v = r[k]!;
          if (v < lo) { lo = v; nLo = 1; } else if (v === lo) nLo++;
          if (v > hi) { hi = v; nHi = 1; } else if (v === hi) nHi++;
        }
        this.sumSq[c] = ss; this.lo[c] = lo; this.hi[c] = hi; this.atLo[c] = nLo; this.atHi[c] = nHi;
      }
      this.n += take;
      i += take;
      if (this.n === this.blockSamples) {
        emit(this.report(rmsLimitUv));
        this.reset();
      }
    }
  }

  private report(rmsLimitUv: Float64Array | null): QualityChannel[] {
    return this.names.map((name, c) => {
      const rmsUv = Math.sqrt(this.sumSq[c]! / this.n);
      const flat = !(this.hi[c]! - this.lo[c]! >= FLAT_UV);
      const saturated = !flat && Math.max(this.atLo[c]!, this.atHi[c]!) >= CLIP_FRACTION * this.n;
      const loud = rmsLimitUv !== null && !(rmsUv <= rmsLimitUv[c]!);
      return { name, rmsUv: Number.isFinite(rmsUv) ? rmsUv : 0, flat, saturated, flagged: flat || saturated || loud };
    });
  }
}
