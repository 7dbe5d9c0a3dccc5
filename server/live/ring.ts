/**
 * Filtered samples of one session, per channel, in a fixed ring of float64 (allocated once).
 * Indices are absolute stream positions counted from the ring's first written sample; the ring
 * holds the last `capacity` of them.
 */
import type { ChannelMajor } from '../../shared/types';

export class SampleRing {
  private readonly rows: Float64Array[];
  private written = 0;

  constructor(readonly channels: number, readonly capacity: number) {
    if (!(capacity >= 1)) throw new RangeError(`ring capacity must be >= 1, got ${capacity}`);
    this.rows = Array.from({ length: channels }, () => new Float64Array(capacity));
  }

  /** Samples written so far (the next sample's index). */
  get end(): number { return this.written; }
  /** Oldest index still held. */
  get start(): number { return Math.max(0, this.written - this.capacity); }

  /** Appends the first `n` samples of every channel of `chunk`. */
  write(chunk: ChannelMajor, n: number): void {
    const from = Math.max(0, n - this.capacity);
    const cap = this.capacity;
    for (let c = 0; c < this.channels; c++) {
      const src = chunk[c]!, dst = this.rows[c]!;
      let pos = (this.written + from) % cap;
      for (let i = from; i < n; i++) {
        dst[pos] = src[i]!;
        if (++pos === cap) pos = 0;
      }
    }
    this.written += n;
  }

  /** True when [from, from + length) is fully held. */
  holds(from: number, length: number): boolean {
    return from >= this.start && from + length <= this.written;
  }

  /**
   * A copy of [from, from + length) as [channel][sample]; the range must be held. Written into
   * `out` when given (one array of `length` per channel), else into new arrays.
   */
  read(from: number, length: number, out?: ChannelMajor): ChannelMajor {
    if (!this.holds(from, length)) {
      throw new RangeError(`ring holds [${this.start}, ${this.written}), asked for [${from}, ${from + length})`);
    }
    const cap = this.capacity;
    return this.rows.map((row, c) => {
      const dst = out?.[c] ?? new Float64Array(length);
      const p = from % cap;
      const first = Math.min(length, cap - p);
      dst.set(row.subarray(p, p + first), 0);
      if (first < length) dst.set(row.subarray(0, length - first), first);
      return dst;
    });
  }

  /**
   * Per-channel peak-to-peak and RMS over [from, from + length) into `pp` and `rms` (µV); the
   * range must be held.
   */
  stats(from: number, length: number, pp: Float64Array, rms: Float64Array): void {
    if (!this.holds(from, length)) {
      throw new RangeError(`ring holds [${this.start}, ${this.written}), asked for [${from}, ${from + length})`);
    }
    const cap = this.capacity;
    for (let c = 0; c < this.channels; c++) {
      const row = this.rows[c]!;
      let lo = Infinity, hi = -Infinity, ss = 0;
      let p = from % cap;
      for (let i = 0; i < length; i++) {
        const v = row[p]!;
        if (v < lo) lo = v;
        if (v > hi) hi = v;
        ss += v * v;
        if (++p === cap) p = 0;
      }
      pp[c] = hi - lo;
      rms[c] = Math.sqrt(ss / length);
    }
  }
}
