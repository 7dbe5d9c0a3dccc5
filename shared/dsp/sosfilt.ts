import type { ChannelMajor } from '../types';
import { ShapeError } from '../types';
import { checkSos, packSos, type Sos } from './sos';

/**
 * Filter memory of a cascade of second-order sections for several channels: transposed direct
 * form II, two values per section, as SciPy's `sosfilt` keeps `zi` of shape (sections, 2).
 * `z` is laid out [channel][section][2], flattened.
 */
export interface SosState {
  readonly channels: number;
  readonly sections: number;
  readonly z: Float64Array; // [channel][section][2], length channels * sections * 2
}

/**
 * Zero state: the filter starts at rest (as `sosfilt` without `zi`).
 * @param channels number of channels the state will filter
 */
export function createSosState(sos: Sos, channels: number): SosState {
  checkSos(sos);
  if (!(Number.isInteger(channels) && channels >= 0)) throw new ShapeError('channels', `expected an integer >= 0, got ${channels}`);
  return { channels, sections: sos.length, z: new Float64Array(channels * sos.length * 2) };
}

/**
 * Steady-state step response initial conditions of the cascade for a unit input (SciPy's
 * `sosfilt_zi`: per section `lfilter_zi`, i.e. solve (I − Aᵀ)·zi = b[1:] − a[1:]·b0, scaled by the
 * DC gain of the sections before it; Gustafsson 1996, IEEE Trans Signal Process 44(4):988-992).
 * @returns [section][2]
 */
export function sosfiltZi(sos: Sos): Float64Array {
  checkSos(sos);
  const zi = new Float64Array(sos.length * 2);
  let scale = 1;
  sos.forEach((row, s) => {
    const [b0, b1, b2, , a1, a2] = row as [number, number, number, number, number, number];
    // (I − companion(a)ᵀ) = [[1 + a1, −1], [a2, 1]]; right-hand side B = [b1 − a1·b0, b2 − a2·b0].
    const B0 = b1 - a1 * b0;
    const B1 = b2 - a2 * b0;
    const z0 = (B0 + B1) / (1 + a1 + a2);
    zi[2 * s] = scale * z0;
    zi[2 * s + 1] = scale * (B1 - a2 * z0);
    scale *= (b0 + b1 + b2) / (1 + a1 + a2);
  });
  return zi;
}

/**
 * State in which a constant input equal to each channel's first sample passes without a start-up
 * transient: `sosfiltZi(sos)` scaled by `firstSamples[channel]` (SciPy: `sosfilt_zi(sos) * x[0]`).
 * @param firstSamples one value per channel (µV, the first sample of each channel)
 */
export function steadyStateFor(sos: Sos, firstSamples: Float64Array): SosState {
  const zi = sosfiltZi(sos);
  const channels = firstSamples.length;
  const z = new Float64Array(channels * zi.length);
  for (let ch = 0; ch < channels; ch++) {
    const x0 = firstSamples[ch]!;
    for (let i = 0; i < zi.length; i++) z[ch * zi.length + i] = zi[i]! * x0;
  }
  return { channels, sections: sos.length, z };
}

function checkState(sos: Sos, channels: number, state: SosState): void {
  const expected = channels * sos.length * 2;
  if (state.channels !== channels || state.sections !== sos.length || state.z.length !== expected) {
    throw new ShapeError('state', `expected [${channels}][${sos.length}][2], got [${state.channels}][${state.sections}][2]` +
      ` with ${state.z.length} values`);
  }
}

/**
 * The kernel: filters `n` samples of one channel through all sections, advancing `z` (offset `zo`).
 * Section by section over the chunk; per sample the arithmetic is SciPy's `_sosfilt` exactly:
 *   y = b0·x + z0;  z0 = b1·x − a1·y + z1;  z1 = b2·x − a2·y.
 * `x` and `y` may be the same array.
 */
function filterChannel(packed: Float64Array, x: Float64Array, y: Float64Array, n: number,
                       z: Float64Array, zo: number): void {
  const sections = packed.length / 5;
  let src = x;
  for (let s = 0; s < sections; s++) {
    const b0 = packed[5 * s]!, b1 = packed[5 * s + 1]!, b2 = packed[5 * s + 2]!;
    const a1 = packed[5 * s + 3]!, a2 = packed[5 * s + 4]!;
    let z0 = z[zo + 2 * s]!, z1 = z[zo + 2 * s + 1]!;
    for (let i = 0; i < n; i++) {
      const xi = src[i]!;
      const yi = b0 * xi + z0;
      z0 = b1 * xi - a1 * yi + z1;
      z1 = b2 * xi - a2 * yi;
      y[i] = yi;
    }
    z[zo + 2 * s] = z0;
    z[zo + 2 * s + 1] = z1;
    src = y;
  }
}

/**
 * Causal filtering of one chunk with carried state (SciPy `sosfilt(sos, x, zi=state)`):
 * filtering a signal chunk by chunk equals filtering it whole, for any chunking (empty and
 * one-sample chunks included). Advances `state`; never modifies `chunk`. NaN propagates (it is
 * data) and stays in the state until the filter is reset.
 * @param chunk [channel][sample], all channels the same length
 * @param state from `createSosState(sos, chunk.length)` or `steadyStateFor`; advanced in place
 * @param out optional [channel][sample] buffers of the chunk's length to write into (may alias `chunk`)
 * @returns [channel][sample], the filtered chunk
 * @throws ShapeError naming `chunk`, `state` or `out` when shapes disagree
 */
export function sosfiltChunk(sos: Sos, chunk: ChannelMajor, state: SosState, out?: ChannelMajor): ChannelMajor {
  checkSos(sos);
  const channels = chunk.length;
  checkState(sos, channels, state);
  const n = channels > 0 ? chunk[0]!.length : 0;
  for (let ch = 0; ch < channels; ch++) {
    if (chunk[ch]!.length !== n) throw new ShapeError('chunk', `channel ${ch} has ${chunk[ch]!.length} samples, channel 0 has ${n}`);
  }
  if (out && (out.length !== channels || out.some((o) => o.length !== n))) {
    throw new ShapeError('out', `expected [${channels}][${n}], got [${out.length}][${out[0]?.length ?? 0}]`);
  }
  const packed = packSos(sos);
  const result = out ?? Array.from({ length: channels }, () => new Float64Array(n));
  for (let ch = 0; ch < channels; ch++) {
    filterChannel(packed, chunk[ch]!, result[ch]!, n, state.z, ch * sos.length * 2);
  }
  return result;
}

/**
 * Single-channel form of {@link sosfiltChunk}: `state` must have one channel. Advances `state`.
 * @returns the filtered samples (a new array unless `out` is given)
 */
export function sosfiltChunk1(sos: Sos, x: Float64Array, state: SosState, out?: Float64Array): Float64Array {
  checkSos(sos);
  checkState(sos, 1, state);
  if (out && out.length !== x.length) throw new ShapeError('out', `expected ${x.length} samples, got ${out.length}`);
  const y = out ?? new Float64Array(x.length);
  filterChannel(packSos(sos), x, y, x.length, state.z, 0);
  return y;
}

/**
 * Offline causal filtering: fresh (zero) state, one chunk. Same code as the live path.
 * @param x [channel][sample]
 * @returns [channel][sample]
 */
export function sosfilt(sos: Sos, x: ChannelMajor): ChannelMajor {
  return sosfiltChunk(sos, x, createSosState(sos, x.length));
}

/**
 * Zero-phase forward-backward filtering for OFFLINE DISPLAY ONLY: it needs the future of the
 * signal, so it can never run in the online path (use `sosfiltChunk` there). Follows SciPy's
 * `sosfiltfilt` with its defaults (Gustafsson 1996, IEEE Trans Signal Process 44(4):988-992):
 * odd extension of padlen = 3·(2·sections + 1 − min(#b2 = 0, #a2 = 0)) samples at both ends,
 * forward pass from `sosfilt_zi`·first sample, backward pass from `sosfilt_zi`·last output.
 * Differs from SciPy only for short signals: SciPy refuses n <= padlen; here padlen is
 * reduced to n − 1. The magnitude response is |H|², the phase zero.
 * @param x [channel][sample]; not modified
 * @returns [channel][sample]
 */
export function sosfiltfilt(sos: Sos, x: ChannelMajor): ChannelMajor {
  checkSos(sos);
  const n = x.length > 0 ? x[0]!.length : 0;
  x.forEach((c, ch) => {
    if (c.length !== n) throw new ShapeError('x', `channel ${ch} has ${c.length} samples, channel 0 has ${n}`);
  });
  return x.map((c) => sosfiltfilt1(sos, c));
}

/** Single-channel {@link sosfiltfilt}: same method, offline display only. */
export function sosfiltfilt1(sos: Sos, x: Float64Array): Float64Array {
  checkSos(sos);
  const n = x.length;
  if (n === 0) return new Float64Array(0);
  const zeroB2 = sos.filter((r) => r[2] === 0).length;
  const zeroA2 = sos.filter((r) => r[5] === 0).length;
  const ntaps = 2 * sos.length + 1 - Math.min(zeroB2, zeroA2);
  const edge = Math.min(3 * ntaps, n - 1);
  const m = n + 2 * edge;
  const ext = new Float64Array(m);
  // Odd extension: 2·x[0] − x[edge..1] before, 2·x[n−1] − x[n−2..n−1−edge] after.
  for (let i = 0; i < edge; i++) ext[i] = 2 * x[0]! - x[edge - i]!;
  ext.set(x, edge);
  for (let i = 0; i < edge; i++) ext[edge + n + i] = 2 * x[n - 1]! - x[n - 2 - i]!;
  const zi = sosfiltZi(sos);
  const pass = (buf: Float64Array) => {
    const state = { channels: 1, sections: sos.length, z: zi.map((v) => v * buf[0]!) };
    sosfiltChunk1(sos, buf, state, buf);
  };
  pass(ext);
  ext.reverse();
  pass(ext);
  ext.reverse();
  return ext.slice(edge, edge + n);
}
