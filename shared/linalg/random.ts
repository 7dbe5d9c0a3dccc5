/**
 * Seeded pseudo-random numbers for every stochastic step in Aftercue (ICA initialisation and
 * sample order, fold assignment, the simulator), so that a fit is reproducible from its seed.
 *
 * Generator: Mersenne Twister MT19937 (Matsumoto & Nishimura 1998, "Mersenne twister: a
 * 623-dimensionally equidistributed uniform pseudo-random number generator", ACM TOMACS
 * 8(1):3–30), seeded with the paper's `init_genrand` recurrence. With the same integer seed the
 * 32-bit stream, `nextFloat` (53-bit `genrand_res53`) and `nextNormal` (Marsaglia & Bray 1964
 * polar method, second value cached) equal NumPy's legacy `RandomState(seed)`
 * (`random_raw`, `random_sample`, `standard_normal`); tests/fixtures/ica/random_reference.json
 * checks this bit for bit.
 */
import { ParamError } from '../types';

const N = 624;
const M = 397;
const MATRIX_A = 0x9908b0df;
const UPPER = 0x80000000;
const LOWER = 0x7fffffff;

/** A seeded random stream. Every method advances the stream. */
export interface Rng {
  /** Uniform integer in [0, 2^32). */
  nextUint32(): number;
  /** Uniform double in [0, 1) with 53 random bits. */
  nextFloat(): number;
  /** Standard normal N(0, 1) deviate. */
  nextNormal(): number;
  /** Uniform integer in [0, n), unbiased (rejection sampling); n an integer in [1, 2^32]. */
  nextInt(n: number): number;
  /** Shuffles `a` in place (Fisher–Yates as given by Durstenfeld 1964) and returns it. */
  shuffle<T extends { length: number; [i: number]: unknown }>(a: T): T;
  /** A uniformly random permutation of 0..n-1. */
  permutation(n: number): Uint32Array;
}

class Mt19937 implements Rng {
  private readonly mt = new Uint32Array(N);
  private index = N;
  private cachedNormal: number | null = null;

  constructor(seed: number) {
    const mt = this.mt;
    mt[0] = seed >>> 0;
    for (let i = 1; i < N; i++) {
      const prev = mt[i - 1]!;
      // init_genrand: mt[i] = 1812433253 * (mt[i-1] ^ (mt[i-1] >>> 30)) + i  (mod 2^32)
      mt[i] = (Math.imul(1812433253, prev ^ (prev >>> 30)) + i) >>> 0;
    }
  }

  private twist(): void {
    const mt = this.mt;
    for (let i = 0; i < N; i++) {
      const y = (mt[i]! & UPPER) | (mt[(i + 1) % N]! & LOWER);
      let v = mt[(i + M) % N]! ^ (y >>> 1);
      if (y & 1) v ^= MATRIX_A;
      mt[i] = v >>> 0;
    }
    this.index = 0;
  }

  nextUint32(): number {
    if (this.index >= N) this.twist();
    let y = this.mt[this.index++]!;
    y ^= y >>> 11;
    y ^= (y << 7) & 0x9d2c5680;
    y ^= (y << 15) & 0xefc60000;
    y ^= y >>> 18;
    return y >>> 0;
  }

  nextFloat(): number {
    const a = this.nextUint32() >>> 5;
    const b = this.nextUint32() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }

  nextNormal(): number {
    if (this.cachedNormal !== null) {
      const g = this.cachedNormal;
      this.cachedNormal = null;
      return g;
    }
    let x1: number;
    let x2: number;
    let r2: number;
    do {
      x1 = 2 * this.nextFloat() - 1;
      x2 = 2 * this.nextFloat() - 1;
      r2 = x1 * x1 + x2 * x2;
    } while (r2 >= 1 || r2 === 0);
    const f = Math.sqrt(-2 * Math.log(r2) / r2);
    this.cachedNormal = f * x1;
    return f * x2;
  }

  nextInt(n: number): number {
    if (!Number.isInteger(n) || n < 1 || n > 4294967296) {
      throw new ParamError('n', `expected an integer in [1, 2^32], got ${n}`);
    }
    // Accept only draws below the largest multiple of n, so every residue is equally likely.
    const limit = Math.floor(4294967296 / n) * n;
    let u = this.nextUint32();
    while (u >= limit) u = this.nextUint32();
    return u % n;
  }

  shuffle<T extends { length: number; [i: number]: unknown }>(a: T): T {
    for (let i = a.length - 1; i > 0; i--) {
      const j = this.nextInt(i + 1);
      const tmp = a[i];
      a[i] = a[j];
      a[j] = tmp;
    }
    return a;
  }

  permutation(n: number): Uint32Array {
    const p = new Uint32Array(n);
    for (let i = 0; i < n; i++) p[i] = i;
    return this.shuffle(p);
  }
}

/**
 * Creates a seeded random stream (MT19937, see the module comment).
 * @param seed an integer in [0, 2^32); the same seed always gives the same stream
 */
export function createRng(seed: number): Rng {
  if (!Number.isInteger(seed) || seed < 0 || seed > 4294967295) {
    throw new ParamError('seed', `expected an integer in [0, 2^32), got ${seed}`);
  }
  return new Mt19937(seed);
}
