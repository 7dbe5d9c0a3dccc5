/**
 * Raw feed samples into decoder order, the same way live and offline: float32 interleaved
 * [sample][channel] in, float64 channel-major out, channels picked by a map.
 *
 * Missing and non-finite samples are filled by holding each channel's last finite value (0
 * before the first one): a GAP's samples never arrive and a NaN would poison the IIR state for
 * good. Trials whose epoch overlaps a filled sample are flagged ('gap' / 'dropout') and kept out
 * of accuracy, so the fill only has to keep the filters sane, and live and offline fill alike.
 */
import { normaliseChannelName } from '../../shared/montage';
import type { ChannelMajor } from '../../shared/types';

/**
 * For each wanted channel, its index among the feed's channels (matched by canonical 10-10
 * name), or the names that are missing.
 */
export function channelMap(feedChannels: readonly string[], wanted: readonly string[]):
  { map: Int32Array; missing: string[] } {
  const index = new Map(feedChannels.map((n, i) => [normaliseChannelName(n), i]));
  const missing: string[] = [];
  const map = Int32Array.from(wanted, (name) => {
    const i = index.get(normaliseChannelName(name));
    if (i === undefined) missing.push(name);
    return i ?? -1;
  });
  return { map, missing };
}

/**
 * Copies `n` samples of the mapped channels from interleaved `src` (`feedChannels` values per
 * sample) into `out[c][outOffset ..]`, holding `last[c]` over non-finite values; updates `last`.
 * @returns how many values were non-finite
 */
export function deinterleaveHold(src: Float32Array, feedChannels: number, n: number, map: Int32Array,
                                 out: ChannelMajor, outOffset: number, last: Float64Array): number {
  let bad = 0;
  for (let c = 0; c < map.length; c++) {
    const dst = out[c]!;
    let hold = last[c]!;
    for (let i = 0, k = map[c]!; i < n; i++, k += feedChannels) {
      const v = src[k]!;
      if (v - v === 0) hold = v; // finite (NaN and ±Infinity fail)
      else bad++;
      dst[outOffset + i] = hold;
    }
    last[c] = hold;
  }
  return bad;
}

/** Fills `out[c][outOffset .. outOffset + n)` with `last[c]` (samples a GAP announced missing). */
export function fillHold(out: ChannelMajor, outOffset: number, n: number, last: Float64Array): void {
  for (let c = 0; c < out.length; c++) out[c]!.fill(last[c]!, outOffset, outOffset + n);
}
