import type { ChannelMajor } from '../types';
import { ShapeError } from '../types';

/**
 * Common average reference (Offner 1950, "The EEG as potential mapping: the value of the average
 * monopolar reference", Electroencephalogr Clin Neurophysiol 2:213-214; Bertrand, Perrin & Pernier
 * 1985, Electroencephalogr Clin Neurophysiol 62:462-464): from every included channel subtract,
 * sample by sample, the mean over the included channels. Excluded channels (bad channels, EOG,
 * ...) neither enter the mean nor are re-referenced: they pass through unchanged.
 * Memoryless, so applying it chunk by chunk equals applying it whole. A NaN in an included
 * channel makes that sample NaN in every included channel (NaN is data).
 * @param x [channel][sample] in µV; not modified
 * @param exclude optional flag per channel (true = leave out); length must equal x.length
 * @returns [channel][sample] in µV, new arrays
 */
export function commonAverageReference(x: ChannelMajor, exclude?: readonly boolean[]): ChannelMajor {
  return commonAverageReferenceInPlace(x.map((ch) => ch.slice()), exclude);
}

/**
 * In-place {@link commonAverageReference} for the streaming path: overwrites `x` and returns it.
 * @param scratch optional buffer of at least the chunk length, reused for the mean (no allocation)
 */
export function commonAverageReferenceInPlace(x: ChannelMajor, exclude?: readonly boolean[],
                                              scratch?: Float64Array): ChannelMajor {
  const channels = x.length;
  if (exclude && exclude.length !== channels) {
    throw new ShapeError('exclude', `expected ${channels} flags (one per channel), got ${exclude.length}`);
  }
  const n = channels > 0 ? x[0]!.length : 0;
  for (let ch = 0; ch < channels; ch++) {
    if (x[ch]!.length !== n) throw new ShapeError('x', `channel ${ch} has ${x[ch]!.length} samples, channel 0 has ${n}`);
  }
  let included = 0;
  for (let ch = 0; ch < channels; ch++) if (!exclude?.[ch]) included++;
  if (included === 0 || n === 0) return x;
  const mean = scratch && scratch.length >= n ? scratch : new Float64Array(n);
  mean.fill(0, 0, n);
  for (let ch = 0; ch < channels; ch++) {
    if (exclude?.[ch]) continue;
    const c = x[ch]!;
    for (let i = 0; i < n; i++) mean[i]! += c[i]!;
  }
  const inv = 1 / included;
  for (let i = 0; i < n; i++) mean[i]! *= inv;
  for (let ch = 0; ch < channels; ch++) {
    if (exclude?.[ch]) continue;
    const c = x[ch]!;
    for (let i = 0; i < n; i++) c[i]! -= mean[i]!;
  }
  return x;
}
