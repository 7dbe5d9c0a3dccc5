/**
 * Seeded stratified k-fold plans. Every trial is in exactly one test fold; each class is dealt
 * round-robin over the folds after a seeded shuffle, so per-class counts in any two folds differ
 * by at most one and fold sizes differ by at most one (as in stratified k-fold generally, e.g.
 * Kohavi 1995, IJCAI, "A study of cross-validation and bootstrap for accuracy estimation").
 */
import { ParamError, ShapeError } from '../types';
import { createRng } from '../linalg/random';

/** One split: trial indices (ascending) used for fitting and for testing. */
export interface Fold {
  train: Int32Array;
  test: Int32Array;
}

/** A full partition of the trials into k test folds. */
export interface FoldPlan {
  k: number;
  seed: number;
  folds: Fold[];
}

/**
 * Stratified k-fold split. Classes are taken in ascending label order; within a class the
 * trials are shuffled by MT19937 seeded with `seed` (shared/linalg/random.ts) and dealt to
 * folds 0, 1, ..., k-1, 0, ... continuing where the previous class stopped.
 * @param labels class index per trial (any small non-negative integers)
 * @param k number of folds, 2 <= k <= trials
 */
export function stratifiedKFold(labels: Uint8Array, k: number, seed: number): FoldPlan {
  const n = labels.length;
  if (!Number.isInteger(k) || k < 2) throw new ParamError('k', `expected an integer >= 2, got ${k}`);
  if (k > n) throw new ParamError('k', `expected at most the number of trials (${n}), got ${k}`);
  const rng = createRng(seed >>> 0);
  const foldOf = new Int32Array(n);
  const classes = [...new Set(labels)].sort((a, b) => a - b);
  let slot = 0;
  for (const c of classes) {
    const members: number[] = [];
    for (let i = 0; i < n; i++) if (labels[i] === c) members.push(i);
    rng.shuffle(members);
    for (const i of members) { foldOf[i] = slot % k; slot++; }
  }
  const folds: Fold[] = [];
  for (let f = 0; f < k; f++) {
    const test: number[] = [], train: number[] = [];
    for (let i = 0; i < n; i++) (foldOf[i] === f ? test : train).push(i);
    folds.push({ train: Int32Array.from(train), test: Int32Array.from(test) });
  }
  return { k, seed, folds };
}

/**
 * `repeats` independent stratified k-fold plans; repeat r uses seed `deriveSeed(seed, r)`.
 */
export function repeatedStratifiedKFold(labels: Uint8Array, k: number, repeats: number,
                                        seed: number): FoldPlan[] {
  if (!Number.isInteger(repeats) || repeats < 1) {
    throw new ParamError('repeats', `expected an integer >= 1, got ${repeats}`);
  }
  return Array.from({ length: repeats }, (_, r) => stratifiedKFold(labels, k, deriveSeed(seed, r)));
}

/**
 * Leave-one-group-out plan: fold g tests every trial of the g-th distinct group (ascending group
 * id) and trains on the rest, e.g. one fold per recording run, so temporally correlated trials
 * of a run never straddle training and test (REFERENCES.md §6, last table row).
 * @param groups group id per trial (e.g. run index); at least two distinct ids
 */
export function leaveOneGroupOut(groups: ArrayLike<number>): FoldPlan {
  const ids = [...new Set(Array.from(groups))].sort((a, b) => a - b);
  if (ids.length < 2) throw new ParamError('groups', `expected at least two distinct groups, got ${ids.length}`);
  const folds = ids.map((g) => {
    const test: number[] = [], train: number[] = [];
    for (let i = 0; i < groups.length; i++) (groups[i] === g ? test : train).push(i);
    return { train: Int32Array.from(train), test: Int32Array.from(test) };
  });
  return { k: ids.length, seed: 0, folds };
}

/** Checks that a plan's indices lie in [0, trials) and that train and test are disjoint. */
export function checkFoldPlan(plan: FoldPlan, trials: number): void {
  plan.folds.forEach(({ train, test }, f) => {
    const seen = new Uint8Array(trials);
    for (const [name, idx] of [['train', train], ['test', test]] as const) {
      for (const i of idx) {
        if (i < 0 || i >= trials) throw new ShapeError(`plan.folds[${f}].${name}`, `index ${i} outside [0, ${trials})`);
        if (seen[i]) throw new ShapeError(`plan.folds[${f}]`, `trial ${i} appears twice (train and test must be disjoint)`);
        seen[i] = 1;
      }
    }
  });
}

/**
 * Derives an independent-looking 32-bit seed from a base seed and a path of small integers
 * (repeat, fold, ...) by folding each through the murmur3 fmix32 finaliser (Appleby,
 * MurmurHash3, public domain). Deterministic; gives every repeat and inner plan its own seed.
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
