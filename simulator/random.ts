/**
 * Random streams for the generator, all derived from the profile seed. Each source, channel and
 * event kind draws from its own stream, so turning one artifact kind off (or generating in
 * different chunk sizes) leaves every other draw unchanged.
 *
 * The generator needs ~10^5 normal deviates per second of 64-channel data, so it uses its own
 * small fast generator rather than shared/linalg/random (MT19937, made to match NumPy bit for
 * bit, which is what fitting needs): SFC32 (C. Doty-Humphrey's "small fast chaotic" generator
 * from the PractRand suite, 128-bit state) with Marsaglia & Bray's (1964) polar method for
 * normals, both on 32-bit uniforms. Not cryptographic; reproducible across platforms.
 */

/** A seeded stream; every call advances it. */
export interface Rng {
  /** Uniform integer in [0, 2^32). */
  nextUint32(): number;
  /** Uniform in [0, 1) with 32 random bits. */
  nextFloat(): number;
  /** Standard normal deviate. */
  nextNormal(): number;
  /** Uniform integer in [0, n), n >= 1 (rejection, unbiased). */
  nextInt(n: number): number;
  /** Fisher-Yates (Durstenfeld 1964) shuffle in place; returns `a`. */
  shuffle<T>(a: T[]): T[];
}

class Sfc32 implements Rng {
  private a: number;
  private b: number;
  private c: number;
  private d = 1;
  private spare = 0;
  private hasSpare = false;

  constructor(seed: number) {
    this.a = 0x9e3779b9;
    this.b = seed >>> 0;
    this.c = fmix32(seed ^ 0x6a09e667);
    // PractRand's recommended warm-up for SFC32 seeding: discard the first outputs.
    for (let i = 0; i < 15; i++) this.nextUint32();
  }

  nextUint32(): number {
    const t = (((this.a + this.b) | 0) + this.d) | 0;
    this.d = (this.d + 1) | 0;
    this.a = this.b ^ (this.b >>> 9);
    this.b = (this.c + (this.c << 3)) | 0;
    this.c = (this.c << 21) | (this.c >>> 11);
    this.c = (this.c + t) | 0;
    return t >>> 0;
  }

  nextFloat(): number {
    return this.nextUint32() * 2.3283064365386963e-10;
  }

  nextNormal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let u: number;
    let v: number;
    let s: number;
    do {
      u = this.nextUint32() * 4.656612873077393e-10 - 1;
      v = this.nextUint32() * 4.656612873077393e-10 - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt(-2 * Math.log(s) / s);
    this.spare = v * f;
    this.hasSpare = true;
    return u * f;
  }

  nextInt(n: number): number {
    if (!Number.isInteger(n) || n < 1 || n > 4294967296) throw new RangeError(`expected an integer in [1, 2^32], got ${n}`);
    const limit = Math.floor(4294967296 / n) * n;
    let x = this.nextUint32();
    while (x >= limit) x = this.nextUint32();
    return x % n;
  }

  shuffle<T>(a: T[]): T[] {
    for (let i = a.length - 1; i > 0; i--) {
      const j = this.nextInt(i + 1);
      const t = a[i]!;
      a[i] = a[j]!;
      a[j] = t;
    }
    return a;
  }
}

// murmur3's 32-bit finaliser (Appleby, MurmurHash3, public domain): a bijective avalanche mix.
function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** Seed of stream (`name`, `index`) under the profile seed: FNV-1a of the name, mixed with both numbers. */
export function streamSeed(seed: number, name: string, index = 0): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < name.length; i++) h = Math.imul(h ^ name.charCodeAt(i), 0x01000193);
  return fmix32(fmix32(h ^ seed) ^ Math.imul(index + 1, 0x9e3779b9));
}

/** A stream of its own for (`name`, `index`) under `seed`. */
export function stream(seed: number, name: string, index = 0): Rng {
  return new Sfc32(streamSeed(seed, name, index));
}

/** Uniform in [lo, hi). */
export function uniform(rng: Rng, lo: number, hi: number): number {
  return lo + (hi - lo) * rng.nextFloat();
}

/** Exponential with the given mean (inter-event time of a Poisson process). */
export function exponential(rng: Rng, mean: number): number {
  return -mean * Math.log(1 - rng.nextFloat());
}

/** buf[from..to) = independent N(0, 1) draws. */
export function fillNormal(rng: Rng, buf: Float64Array, from: number, to: number): void {
  for (let i = from; i < to; i++) buf[i] = rng.nextNormal();
}
