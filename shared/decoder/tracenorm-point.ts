/**
 * The solver state of tracenorm-fista.ts (a point: weights, bias, margins and per-block
 * activity, rank and nuclear norm) and small kernels on it.
 */
import type { BlockLayout } from './tracenorm-data';

/** One iterate: W (trial layout), b, its margins z, and per block active flag, rank and ‖W_k‖_*. */
export interface Point { w: Float64Array; b: number; z: Float64Array; act: Uint8Array; rank: Int32Array; nuc: Float64Array }

/** A zero point for `dim` weights, n trials, nb blocks. */
export function newPoint(dim: number, n: number, nb: number): Point {
  return { w: new Float64Array(dim), b: 0, z: new Float64Array(n), act: new Uint8Array(nb), rank: new Int32Array(nb), nuc: new Float64Array(nb) };
}

/** ‖X_k‖_F over all trials, per block. */
export function blockFrobenius(x: Float64Array, n: number, layout: BlockLayout): Float64Array {
  const out = new Float64Array(layout.offsets.length);
  for (let k = 0; k < out.length; k++) {
    const o = layout.offsets[k]!;
    let acc = 0;
    for (let i = 0; i < n; i++) {
      const base = i * layout.dim + o;
      for (let j = 0; j < layout.sizes[k]!; j++) acc += x[base + j]! ** 2;
    }
    out[k] = Math.sqrt(acc);
  }
  return out;
}

/** dst ← src, every field. */
export function copyPoint(src: Point, dst: Point): void {
  dst.w.set(src.w);
  dst.b = src.b;
  dst.z.set(src.z);
  dst.act.set(src.act);
  dst.rank.set(src.rank);
  dst.nuc.set(src.nuc);
}

/** Σ a_j². */
export function sqNorm(a: Float64Array): number {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += a[j]! * a[j]!;
  return s;
}

/** W_k ← (W_k + W_kᵀ)/2 for the n×n block at offset o (n = 0: nothing); a no-op on a symmetric block. */
export function symmetrizeBlock(w: Float64Array, o: number, n: number): void {
  for (let a = 0; a < n; a++) for (let c = 0; c < a; c++) {
    const m = 0.5 * (w[o + a * n + c]! + w[o + c * n + a]!);
    w[o + a * n + c] = m;
    w[o + c * n + a] = m;
  }
}
