/**
 * Scalp-map interpolation on the 2-D electrode layout (u, v) of shared/montage: a biharmonic
 * spline (Sandwell 1987, "Biharmonic spline interpolation of GEOS-3 and SEASAT altimeter data",
 * Geophys Res Lett 14(2):139-142): s(x) = Σ_j α_j g(|x - x_j|), g(r) = r² (ln r - 1), with the
 * α_j solved so the surface passes exactly through every electrode value.
 */
import { positionOf } from '@shared/montage';

export interface PlacedValue {
  name: string;
  u: number;
  v: number;
  value: number;
}

/** Channels with a known 10-10 position and a finite value; the rest are left out (and listed). */
export function placeValues(channelNames: readonly string[], values: readonly number[]): { placed: PlacedValue[]; unplaced: string[] } {
  const placed: PlacedValue[] = [];
  const unplaced: string[] = [];
  channelNames.forEach((name, i) => {
    const p = positionOf(name);
    const value = values[i];
    if (p && value !== undefined && Number.isFinite(value)) placed.push({ name, u: p.u, v: p.v, value });
    else unplaced.push(name);
  });
  return { placed, unplaced };
}

function green(r: number): number {
  return r <= 0 ? 0 : r * r * (Math.log(r) - 1);
}

/** Solve A x = b in place by Gaussian elimination with partial pivoting (A is n x n, row-major). */
function solve(a: Float64Array, b: Float64Array, n: number): Float64Array {
  for (let k = 0; k < n; k++) {
    let piv = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(a[i * n + k]!) > Math.abs(a[piv * n + k]!)) piv = i;
    if (a[piv * n + k] === 0) throw new Error('scalp map: electrode positions coincide');
    if (piv !== k) {
      for (let j = 0; j < n; j++) {
        const t = a[k * n + j]!;
        a[k * n + j] = a[piv * n + j]!;
        a[piv * n + j] = t;
      }
      const t = b[k]!;
      b[k] = b[piv]!;
      b[piv] = t;
    }
    for (let i = k + 1; i < n; i++) {
      const f = a[i * n + k]! / a[k * n + k]!;
      if (f === 0) continue;
      for (let j = k; j < n; j++) a[i * n + j]! -= f * a[k * n + j]!;
      b[i]! -= f * b[k]!;
    }
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i]!;
    for (let j = i + 1; j < n; j++) s -= a[i * n + j]! * x[j]!;
    x[i] = s / a[i * n + i]!;
  }
  return x;
}

export interface ScalpSpline {
  points: readonly PlacedValue[];
  alpha: Float64Array;
}

/** Fit the spline through the placed values (at least one). One value gives a flat map. */
export function fitScalpSpline(points: readonly PlacedValue[]): ScalpSpline {
  const n = points.length;
  if (n === 0) throw new Error('scalp map: no electrode with a known position');
  const a = new Float64Array(n * n);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    b[i] = points[i]!.value;
    for (let j = 0; j < n; j++) {
      a[i * n + j] = green(Math.hypot(points[i]!.u - points[j]!.u, points[i]!.v - points[j]!.v));
    }
  }
  if (n === 1) return { points, alpha: new Float64Array([NaN]) };
  return { points, alpha: solve(a, b, n) };
}

/** The spline's value at (u, v). */
export function evaluateSpline(s: ScalpSpline, u: number, v: number): number {
  if (s.points.length === 1) return s.points[0]!.value;
  let sum = 0;
  for (let j = 0; j < s.points.length; j++) {
    const p = s.points[j]!;
    sum += s.alpha[j]! * green(Math.hypot(u - p.u, v - p.v));
  }
  return sum;
}

/** The head's radius in (u, v): the unit circle (Fpz-T7-Oz-T8), widened to hold outer electrodes. */
export function headRadius(points: readonly PlacedValue[]): number {
  let r = 1;
  for (const p of points) r = Math.max(r, Math.hypot(p.u, p.v) * 1.04);
  return r;
}

/**
 * The map on a size x size grid covering [-radius, radius]² (row 0 = front, +v up), row-major;
 * NaN outside the head circle.
 */
export function scalpGrid(s: ScalpSpline, size: number, radius: number): Float64Array {
  const out = new Float64Array(size * size);
  for (let row = 0; row < size; row++) {
    const v = radius - ((row + 0.5) / size) * 2 * radius;
    for (let col = 0; col < size; col++) {
      const u = -radius + ((col + 0.5) / size) * 2 * radius;
      out[row * size + col] = Math.hypot(u, v) <= radius ? evaluateSpline(s, u, v) : NaN;
    }
  }
  return out;
}
