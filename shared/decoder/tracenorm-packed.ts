/**
 * Packed storage of symmetric feature blocks for the trace-norm solver (tracenorm-fista.ts).
 * A symmetric n×n block has n(n+1)/2 distinct entries; keeping each trial's lower triangle in
 * one contiguous row halves the two O(trials × entries) kernels of every FISTA step, and makes
 * their loops long and contiguous:
 *   margin part  ⟨W, X_i⟩ = Σ_a W_aa X_i,aa + 2 Σ_{a>b} W_ab X_i,ab   (W, X_i symmetric)
 *   gradient     ∇_W Σ_i r_i ⟨W, X_i⟩ = Σ_i r_i X_i, formed on the lower triangle and mirrored.
 * Both are exact rewritings (only the rounding order differs from the full sums).
 */
import type { BlockLayout, BlockShape } from './tracenorm-data';

/** Lower triangles of the symmetric blocks, per block k (null for other blocks). */
export interface PackedBlocks {
  side: Int32Array; // [block] n for symmetric blocks, 0 otherwise
  x: Array<Float64Array | null>; // [block] → [trial][n(n+1)/2], row-major lower triangle
  w: Array<Float64Array | null>; // [block] scratch: packed weights, off-diagonal doubled
  g: Array<Float64Array | null>; // [block] scratch: packed gradient
}

/** Packs the lower triangles of every block flagged symmetric (row a: entries b = 0..a). */
export function packSymmetricBlocks(x: Float64Array, nTrials: number, layout: BlockLayout, blocks: ReadonlyArray<BlockShape>): PackedBlocks {
  const side = Int32Array.from(blocks, (b) => (b.symmetric === true ? b.rows : 0));
  const px = blocks.map((_, k) => {
    const n = side[k]!;
    if (n === 0) return null;
    const m = (n * (n + 1)) / 2;
    const out = new Float64Array(nTrials * m);
    const o = layout.offsets[k]!;
    for (let i = 0; i < nTrials; i++) {
      let p = i * m;
      const base = i * layout.dim + o;
      for (let a = 0; a < n; a++) for (let c = 0; c <= a; c++) out[p++] = x[base + a * n + c]!;
    }
    return out;
  });
  const scratch = () => blocks.map((_, k) => (side[k]! > 0 ? new Float64Array((side[k]! * (side[k]! + 1)) / 2) : null));
  return { side, x: px, w: scratch(), g: scratch() };
}

/** Adds ⟨W_k, X_ik⟩ of the active symmetric blocks to out[i] (w full layout, symmetric blocks symmetric). */
export function addSymmetricMargins(pb: PackedBlocks, layout: BlockLayout, w: Float64Array, active: Uint8Array, nTrials: number, out: Float64Array): void {
  for (let k = 0; k < pb.side.length; k++) {
    const n = pb.side[k]!;
    if (n === 0 || active[k] === 0) continue;
    const wp = pb.w[k]!;
    const xp = pb.x[k]!;
    const o = layout.offsets[k]!;
    let p = 0;
    for (let a = 0; a < n; a++) {
      for (let c = 0; c < a; c++) wp[p++] = 2 * w[o + a * n + c]!;
      wp[p++] = w[o + a * n + a]!;
    }
    const m = wp.length;
    for (let i = 0; i < nTrials; i++) {
      const base = i * m;
      let s = 0;
      for (let j = 0; j < m; j++) s += xp[base + j]! * wp[j]!;
      out[i] = out[i]! + s;
    }
  }
}

/** g[o .. o + n²) = Σ_i r_i X_ik for symmetric block k (exactly symmetric). */
export function symmetricGradient(pb: PackedBlocks, k: number, o: number, resid: Float64Array, g: Float64Array): void {
  const n = pb.side[k]!;
  const gp = pb.g[k]!;
  const xp = pb.x[k]!;
  const m = gp.length;
  gp.fill(0);
  for (let i = 0; i < resid.length; i++) {
    const r = resid[i]!;
    if (r === 0) continue;
    const base = i * m;
    for (let j = 0; j < m; j++) gp[j] = gp[j]! + r * xp[base + j]!;
  }
  let p = 0;
  for (let a = 0; a < n; a++) {
    for (let c = 0; c <= a; c++) {
      const v = gp[p++]!;
      g[o + a * n + c] = v;
      g[o + c * n + a] = v;
    }
  }
}
