/**
 * Small seeded pseudo-random generators for fold plans and test data.
 *
 * Interim home: a project-wide `shared/linalg/random.ts` is being written elsewhere; once it
 * exists, fold plans should move to it (the fold assignment for a given seed would change).
 */

/** A source of uniform numbers in [0, 1). */
export type Rng = () => number;

/**
 * mulberry32 (Tommy Ettinger's public-domain 32-bit generator): a 32-bit state advanced by a
 * Weyl increment and mixed by two multiply-xorshift rounds. Period 2^32; fine for shuffling
 * trial indices and for test data, not for cryptography.
 * @param seed any number; only its low 32 bits are used
 * @returns a function giving uniform numbers in [0, 1) with 32-bit resolution
 */
export function mulberry32(seed: number): Rng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Derives an independent-looking 32-bit seed from a base seed and a path of small integers
 * (e.g. repeat, fold), by folding each through the splitmix32-style finaliser
 * (the murmur3 fmix32 constants). Deterministic; used so inner fold plans differ per outer fold.
 */
export function deriveSeed(seed: number, ...path: number[]): number {
  let h = (seed >>> 0) ^ 0x9e3779b9;
  for (const p of [...path, path.length]) {
    h = (h + Math.imul((p >>> 0) + 0x7f4a7c15, 0x85ebca6b)) >>> 0;
    h ^= h >>> 16;
    h = Math.imul(h, 0x85ebca6b) >>> 0;
    h ^= h >>> 13;
    h = Math.imul(h, 0xc2b2ae35) >>> 0;
    h ^= h >>> 16;
  }
  return h >>> 0;
}

/**
 * Standard normal deviates by the Box–Muller transform (Box & Muller 1958, Ann. Math. Stat.
 * 29(2):610–611), two per pair of uniforms; the spare is kept in the closure.
 */
export function normalRng(rng: Rng): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) { const s = spare; spare = null; return s; }
    let u = 0;
    while (u === 0) u = rng();
    const v = rng();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

/** Fisher–Yates shuffle (Durstenfeld 1964, CACM 7(7):420), in place; returns the same array. */
export function shuffleInPlace<T extends { length: number; [i: number]: number }>(a: T, rng: Rng): T {
  for (let i = a.length - 1; i > 0; i--) {
    const j = Math.floor(rng() * (i + 1));
    const t = a[i]!;
    a[i] = a[j]!;
    a[j] = t;
  }
  return a;
}
