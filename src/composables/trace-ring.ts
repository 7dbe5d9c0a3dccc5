/**
 * A preallocated ring of the newest display samples of every channel, for the live trace.
 * Written by the console socket, read once per animation frame by the trace chart. Held with
 * markRaw: Vue never walks or proxies these typed arrays.
 */
export type ChannelRing = Float32Array[]; // [channel][slot], µV

export class TraceRing {
  readonly data: ChannelRing;
  /** Time of each slot, s since the feed started. */
  readonly timesS: Float64Array;
  /** Samples written since creation (the newest is at slot (written - 1) % capacity). */
  written = 0;

  constructor(readonly channels: number, readonly capacity: number) {
    if (!(Number.isInteger(channels) && channels > 0)) throw new Error(`trace ring: expected channels >= 1, got ${channels}`);
    if (!(Number.isInteger(capacity) && capacity > 0)) throw new Error(`trace ring: expected capacity >= 1, got ${capacity}`);
    this.data = Array.from({ length: channels }, () => new Float32Array(capacity));
    this.timesS = new Float64Array(capacity);
  }

  /** Valid samples held (at most the capacity). */
  get length(): number {
    return Math.min(this.written, this.capacity);
  }

  /** Time of the newest sample, s; NaN while empty. */
  get lastTimeS(): number {
    return this.written === 0 ? NaN : this.timesS[(this.written - 1) % this.capacity]!;
  }

  /**
   * Append `samples` interleaved samples ([sample][channel], `channels` wide) whose first sample
   * is at `firstTimeS`, spaced `dtS` apart. Only the newest `capacity` of them are kept.
   */
  write(values: Float32Array, samples: number, firstTimeS: number, dtS: number): void {
    const C = this.channels, cap = this.capacity;
    if (values.length < samples * C) throw new Error(`trace ring: ${samples} samples need ${samples * C} values, got ${values.length}`);
    const skip = Math.max(0, samples - cap);
    for (let s = skip; s < samples; s++) {
      const slot = (this.written + s - skip) % cap;
      const base = s * C;
      for (let c = 0; c < C; c++) this.data[c]![slot] = values[base + c]!;
      this.timesS[slot] = firstTimeS + s * dtS;
    }
    this.written += samples - skip;
  }

  /**
   * Copy the held samples oldest-first into `outTimes` and `outY` (each at least `length` long):
   * outY[c][i] = value * scale + offsets[c]. Returns how many samples were copied.
   */
  copyOrdered(outTimes: Float64Array, outY: Float64Array[], scale: number, offsets: ArrayLike<number>): number {
    const n = this.length, cap = this.capacity;
    const start = this.written > cap ? this.written % cap : 0;
    const head = Math.min(n, cap - start); // slots start..start+head-1, then 0..n-head-1
    outTimes.set(this.timesS.subarray(start, start + head), 0);
    if (n > head) outTimes.set(this.timesS.subarray(0, n - head), head);
    for (let c = 0; c < this.channels; c++) {
      const src = this.data[c]!, dst = outY[c]!, off = offsets[c]!;
      for (let i = 0; i < head; i++) dst[i] = src[start + i]! * scale + off;
      for (let i = head; i < n; i++) dst[i] = src[i - head]! * scale + off;
    }
    return n;
  }

  /**
   * Like copyOrdered, but at most two points per bucket of `bucketSize` samples: each channel's
   * minimum and maximum in the order they occurred (an envelope that keeps spikes, unlike
   * dropping samples). Buckets are aligned to the absolute sample count, so the envelope does not
   * shimmer as the window scrolls. Both points of a bucket share the x of its first and middle
   * sample (one screen column apart at most). Outputs need length + 4 slots. Returns the count.
   */
  copyEnvelope(outTimes: Float64Array, outY: Float64Array[], scale: number, offsets: ArrayLike<number>, bucketSize: number): number {
    const B = Math.floor(bucketSize);
    if (B < 2) return this.copyOrdered(outTimes, outY, scale, offsets);
    const n = this.length, cap = this.capacity;
    const a0 = this.written - n; // absolute index of the oldest sample held
    let m = 0;
    for (let k = Math.floor(a0 / B); k * B < this.written; k++) {
      const from = Math.max(a0, k * B), to = Math.min(this.written, (k + 1) * B);
      const mid = (from + to - 1) >> 1;
      outTimes[m] = this.timesS[from % cap]!;
      outTimes[m + 1] = this.timesS[mid % cap]!;
      for (let c = 0; c < this.channels; c++) {
        const src = this.data[c]!;
        let lo = Infinity, hi = -Infinity, loAt = from, hiAt = from;
        for (let a = from; a < to; a++) {
          const v = src[a % cap]!;
          if (v < lo) { lo = v; loAt = a; }
          if (v > hi) { hi = v; hiAt = a; }
        }
        const first = loAt <= hiAt ? lo : hi, second = loAt <= hiAt ? hi : lo;
        const dst = outY[c]!, off = offsets[c]!;
        dst[m] = first * scale + off;
        dst[m + 1] = second * scale + off;
      }
      m += 2;
    }
    return m;
  }
}
