/**
 * Zero-pole-gain helpers for IIR design, following SciPy's `buttap`, `lp2lp_zpk`, `lp2hp_zpk`,
 * `lp2bp_zpk`, `lp2bs_zpk`, `bilinear_zpk` and `zpk2sos` (pairing 'nearest') operation for
 * operation, so designs match `scipy.signal.butter(..., output='sos')` row for row
 * (Virtanen et al. 2020, SciPy 1.0, Nat Methods 17:261-272). Bilinear transform and
 * frequency transformations: Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed. 2010, ch. 7.
 * Design-time code: clarity over speed (small objects are fine here, never in a sample loop).
 */
import type { Sos } from './sos';

/** A complex number (design-time only). */
export interface Complex { re: number; im: number }

/** A transfer function as zeros, poles and gain (analog s-plane or digital z-plane). */
export interface Zpk { z: Complex[]; p: Complex[]; k: number }

const c = (re: number, im = 0): Complex => ({ re, im });
const add = (a: Complex, b: Complex): Complex => c(a.re + b.re, a.im + b.im);
const sub = (a: Complex, b: Complex): Complex => c(a.re - b.re, a.im - b.im);
const mul = (a: Complex, b: Complex): Complex => c(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
const scale = (a: Complex, s: number): Complex => c(a.re * s, a.im * s);
const abs = (a: Complex): number => Math.hypot(a.re, a.im);
const conj = (a: Complex): Complex => c(a.re, -a.im);
const isReal = (a: Complex): boolean => a.im === 0;

/** Complex division with Smith's (1962) scaling, written as numpy's complex divide loop does. */
function div(a: Complex, b: Complex): Complex {
  const ar = Math.abs(b.re);
  if (ar >= Math.abs(b.im)) {
    if (ar === 0) return c(a.re / ar, a.im / ar);
    const rat = b.im / b.re;
    const scl = 1 / (b.re + b.im * rat);
    return c((a.re + a.im * rat) * scl, (a.im - a.re * rat) * scl);
  }
  const rat = b.re / b.im;
  const scl = 1 / (b.im + b.re * rat);
  return c((a.re * rat + a.im) * scl, (a.im * rat - a.re) * scl);
}

/** Principal square root. */
function sqrt(a: Complex): Complex {
  if (a.re === 0 && a.im === 0) return c(0, a.im);
  const m = abs(a);
  if (a.re >= 0) {
    const t = Math.sqrt((m + a.re) / 2);
    return c(t, a.im / (2 * t));
  }
  const t = Math.sqrt((m - a.re) / 2);
  return c(Math.abs(a.im) / (2 * t), Object.is(a.im, -0) || a.im < 0 ? -t : t);
}

const prod = (xs: Complex[]): Complex => xs.reduce(mul, c(1));

/** Analog Butterworth prototype of order n: poles -exp(i·π·m/(2n)), m = -n+1, -n+3, ..., n-1. */
export function buttap(n: number): Zpk {
  const p: Complex[] = [];
  for (let m = -n + 1; m < n; m += 2) {
    const ang = (Math.PI * m) / (2 * n);
    p.push(m === 0 ? c(-1, -0) : c(-Math.cos(ang), -Math.sin(ang)));
  }
  return { z: [], p, k: 1 };
}

/** Low-pass prototype (cutoff 1 rad/s) -> low-pass with cutoff wo rad/s: s -> s/wo. */
export function lp2lp({ z, p, k }: Zpk, wo: number): Zpk {
  const degree = p.length - z.length;
  return { z: z.map((v) => scale(v, wo)), p: p.map((v) => scale(v, wo)), k: k * wo ** degree };
}

/** Low-pass prototype -> high-pass with cutoff wo rad/s: s -> wo/s (zeros at infinity move to 0). */
export function lp2hp({ z, p, k }: Zpk, wo: number): Zpk {
  const degree = p.length - z.length;
  const w = c(wo);
  const zh = z.map((v) => div(w, v));
  for (let i = 0; i < degree; i++) zh.push(c(0));
  const g = div(prod(z.map((v) => scale(v, -1))), prod(p.map((v) => scale(v, -1))));
  return { z: zh, p: p.map((v) => div(w, v)), k: k * g.re };
}

function shiftPair(xs: Complex[], wo: number): Complex[] {
  const w2 = c(wo * wo);
  const roots = xs.map((v) => sqrt(sub(mul(v, v), w2)));
  return [...xs.map((v, i) => add(v, roots[i]!)), ...xs.map((v, i) => sub(v, roots[i]!))];
}

/**
 * Low-pass prototype -> band-pass with centre wo and bandwidth bw (rad/s): s -> (s² + wo²)/(s·bw);
 * doubles the order.
 */
export function lp2bp({ z, p, k }: Zpk, wo: number, bw: number): Zpk {
  const degree = p.length - z.length;
  const zb = shiftPair(z.map((v) => scale(v, bw / 2)), wo);
  for (let i = 0; i < degree; i++) zb.push(c(0));
  return { z: zb, p: shiftPair(p.map((v) => scale(v, bw / 2)), wo), k: k * bw ** degree };
}

/**
 * Low-pass prototype -> band-stop with centre wo and bandwidth bw (rad/s): s -> s·bw/(s² + wo²);
 * doubles the order, zeros at ±j·wo.
 */
export function lp2bs({ z, p, k }: Zpk, wo: number, bw: number): Zpk {
  const degree = p.length - z.length;
  const h = c(bw / 2);
  const zb = shiftPair(z.map((v) => div(h, v)), wo);
  for (let i = 0; i < degree; i++) zb.push(c(0, wo));
  for (let i = 0; i < degree; i++) zb.push(c(0, -wo));
  const g = div(prod(z.map((v) => scale(v, -1))), prod(p.map((v) => scale(v, -1))));
  return { z: zb, p: shiftPair(p.map((v) => div(h, v)), wo), k: k * g.re };
}

/**
 * Bilinear transform s = 2·fs·(z−1)/(z+1) of an analog zpk (fs in Hz, here SciPy's internal 2);
 * zeros at infinity move to z = −1 (Nyquist).
 */
export function bilinear({ z, p, k }: Zpk, fs: number): Zpk {
  const degree = p.length - z.length;
  const fs2 = c(2 * fs);
  const zz = z.map((v) => div(add(fs2, v), sub(fs2, v)));
  for (let i = 0; i < degree; i++) zz.push(c(-1));
  const g = div(prod(z.map((v) => sub(fs2, v))), prod(p.map((v) => sub(fs2, v))));
  return { z: zz, p: p.map((v) => div(add(fs2, v), sub(fs2, v))), k: k * g.re };
}

/** SciPy's `_cplxreal`: one member (positive imaginary part) of each conjugate pair, then the reals. */
function cplxReal(xs: Complex[]): Complex[] {
  const tol = 100 * Number.EPSILON;
  const sorted = xs.map((v, i) => ({ v, i }))
    .sort((a, b) => a.v.re - b.v.re || Math.abs(a.v.im) - Math.abs(b.v.im) || a.i - b.i).map((e) => e.v);
  const isR = (v: Complex) => Math.abs(v.im) <= tol * abs(v);
  const reals = sorted.filter(isR).map((v) => c(v.re));
  const rest = sorted.filter((v) => !isR(v));
  const zp = rest.filter((v) => v.im > 0);
  const zn = rest.filter((v) => v.im < 0);
  if (zp.length !== zn.length) throw new Error('complex value with no matching conjugate');
  // Runs of (approximately) equal real part are sorted by |imag|.
  for (let start = 0; start < zp.length;) {
    let stop = start + 1;
    while (stop < zp.length && zp[stop]!.re - zp[stop - 1]!.re <= tol * abs(zp[stop - 1]!)) stop++;
    for (const arr of [zp, zn]) {
      const run = arr.slice(start, stop).sort((a, b) => Math.abs(a.im) - Math.abs(b.im));
      arr.splice(start, run.length, ...run);
    }
    start = stop;
  }
  const pairs = zp.map((v, i) => scale(add(v, conj(zn[i]!)), 0.5));
  return [...pairs, ...reals];
}

/** Index of the element nearest to `to`, restricted to real or complex elements; ties: lowest index. */
function nearestIdx(from: Complex[], to: Complex, which: 'real' | 'complex' | 'any'): number {
  let best = -1;
  let bestD = Infinity;
  from.forEach((v, i) => {
    if (which === 'real' && !isReal(v)) return;
    if (which === 'complex' && isReal(v)) return;
    const d = abs(sub(v, to));
    if (d < bestD || best < 0) { best = i; bestD = d; }
  });
  return best;
}

/** Index of the pole closest to the unit circle; ties: lowest index (numpy argmin). */
function worstIdx(p: Complex[], only?: (v: Complex) => boolean): number {
  let best = -1;
  let bestD = Infinity;
  p.forEach((v, i) => {
    if (only && !only(v)) return;
    const d = Math.abs(1 - abs(v));
    if (d < bestD) { best = i; bestD = d; }
  });
  return best;
}

/** Monic polynomial (highest power first) with the given <= 2 roots, real coefficients; padded to 3. */
function quad(roots: Complex[]): [number, number, number] {
  if (roots.length === 0) return [0, 0, 1];
  if (roots.length === 1) return [0, 1, -roots[0]!.re];
  const [r1, r2] = roots as [Complex, Complex];
  return [1, -(r1.re + r2.re), mul(r1, r2).re];
}

function take(xs: Complex[], i: number): Complex {
  return xs.splice(i, 1)[0]!;
}

/**
 * SciPy's `zpk2sos` with pairing 'nearest' for a digital system: the pole closest to the unit
 * circle is paired with its nearest zero and placed in the last section, and so on inwards; the
 * gain goes into the first section.
 * @returns rows [b0, b1, b2, 1, a1, a2]
 */
export function zpk2sos(zpk: Zpk): Sos {
  let z = [...zpk.z];
  let p = [...zpk.p];
  if (z.length === 0 && p.length === 0) return [[zpk.k, 0, 0, 1, 0, 0]];
  while (p.length < z.length) p.push(c(0));
  while (z.length < p.length) z.push(c(0));
  const nSections = (p.length + 1) >> 1;
  if (p.length % 2 === 1) { p.push(c(0)); z.push(c(0)); }
  z = cplxReal(z);
  p = cplxReal(p);
  const sos: Sos = Array.from({ length: nSections }, () => [0, 0, 0, 0, 0, 0]);
  const realCount = (xs: Complex[]) => xs.filter(isReal).length;
  for (let si = nSections - 1; si >= 0; si--) {
    const p1 = take(p, worstIdx(p));
    let zs: Complex[];
    let ps: Complex[];
    if (isReal(p1) && realCount(p) === 0) {
      const z1 = take(z, nearestIdx(z, p1, 'real'));
      zs = [z1, c(0)]; ps = [p1, c(0)];
    } else if (p.length + 1 === z.length && !isReal(p1) && realCount(p) === 1 && realCount(z) === 1) {
      const z1 = take(z, nearestIdx(z, p1, 'complex'));
      zs = [z1, conj(z1)]; ps = [p1, conj(p1)];
    } else {
      const p2 = isReal(p1) ? take(p, worstIdx(p, isReal)) : conj(p1);
      ps = [p1, p2];
      if (z.length > 0) {
        const z1 = take(z, nearestIdx(z, p1, 'any'));
        if (!isReal(z1)) zs = [z1, conj(z1)];
        else if (z.length > 0) zs = [z1, take(z, nearestIdx(z, p1, 'real'))];
        else zs = [z1];
      } else {
        zs = [];
      }
    }
    sos[si] = [...quad(zs), ...quad(ps)];
  }
  const first = sos[0]!;
  for (let j = 0; j < 3; j++) first[j] = first[j]! * zpk.k;
  return sos;
}
