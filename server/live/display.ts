/**
 * Display stream for the console: the filtered signal decimated by block averaging (boxcar of
 * `factor` samples) to at most 250 Hz, packed as binary display frames of about 100 ms. The
 * filtered signal is already band-limited by the decoder's band-pass (upper edge well below
 * 125 Hz for EEG decoders), so the boxcar only has to smooth, not to stop aliasing.
 */
import { encodeDisplayFrame } from '../../shared/api/live';
import type { ChannelMajor } from '../../shared/types';

export const MAX_DISPLAY_RATE_HZ = 250;

/** Block-average factor and resulting display rate for a feed rate. */
export function displayRateFor(sampleRateHz: number): { factor: number; rateHz: number } {
  const factor = Math.max(1, Math.ceil(sampleRateHz / MAX_DISPLAY_RATE_HZ));
  return { factor, rateHz: sampleRateHz / factor };
}
/** Display samples per frame, as a duration. */
export const DISPLAY_FRAME_S = 0.1;

export class DisplayDecimator {
  readonly factor: number;
  readonly rateHz: number;
  private readonly acc: Float64Array;
  private accN = 0;
  /** Feed index of the first input sample of the current accumulation. */
  private accFirst = 0;
  private readonly frame: Float32Array;
  private frameN = 0;
  private frameFirst = 0;
  private readonly frameSamples: number;

  constructor(readonly channels: number, sampleRateHz: number) {
    ({ factor: this.factor, rateHz: this.rateHz } = displayRateFor(sampleRateHz));
    this.acc = new Float64Array(channels);
    this.frameSamples = Math.max(1, Math.round(this.rateHz * DISPLAY_FRAME_S));
    this.frame = new Float32Array(this.frameSamples * channels);
  }

  /** Drops a partly filled frame (when nobody watched for a while). */
  reset(): void {
    this.acc.fill(0);
    this.accN = 0;
    this.frameN = 0;
  }

  /**
   * Adds samples [from, to) of a filtered chunk whose sample `from` is feed index `feedIndex`;
   * calls `emit` with each finished frame's bytes.
   */
  add(filtered: ChannelMajor, from: number, to: number, feedIndex: number, emit: (bytes: Uint8Array) => void): void {
    const ch = this.channels;
    for (let i = from; i < to; i++) {
      if (this.accN === 0) this.accFirst = feedIndex + (i - from);
      for (let c = 0; c < ch; c++) this.acc[c]! += filtered[c]![i]!;
      if (++this.accN < this.factor) continue;
      if (this.frameN === 0) this.frameFirst = this.accFirst;
      const base = this.frameN * ch;
      for (let c = 0; c < ch; c++) {
        this.frame[base + c] = this.acc[c]! / this.factor;
        this.acc[c] = 0;
      }
      this.accN = 0;
      if (++this.frameN === this.frameSamples) {
        emit(encodeDisplayFrame({ channels: ch, samples: this.frameN, firstSampleIndex: this.frameFirst, sampleRateHz: this.rateHz,
          data: this.frame }));
        this.frameN = 0;
      }
    }
  }
}
