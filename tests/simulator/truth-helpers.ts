/**
 * What the decodability and prior checks share: the simulation profile they train on (invented
 * data), the diagnostic seed knob, and the measures that compare a decoder's components with the
 * simulator's ground truth.
 */
import { readFileSync } from 'node:fs';
import type { GroundTruth } from '../../simulator';

export const PROFILE = JSON.parse(readFileSync(new URL('../fixtures/simulator/decodability-hand-imagery.json', import.meta.url), 'utf8')) as Record<string, unknown>;
/** Diagnostic knob for docs/decodability.md (other simulation seeds); unset in normal runs. */
export const SIM_SEED = process.env.AFTERCUE_DECODABILITY_SEED === undefined ? undefined : Number(process.env.AFTERCUE_DECODABILITY_SEED);
export const CLASSES: [string, string] = ['left-hand', 'right-hand'];

/** Pearson correlation over channels (a mixing column against a truth pattern; CAR does not change it). */
export function pearson(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length;
  let ma = 0, mb = 0;
  for (let i = 0; i < n; i++) { ma += a[i]! / n; mb += b[i]! / n; }
  let ab = 0, aa = 0, bb = 0;
  for (let i = 0; i < n; i++) { ab += (a[i]! - ma) * (b[i]! - mb); aa += (a[i]! - ma) ** 2; bb += (b[i]! - mb) ** 2; }
  return ab / Math.sqrt(aa * bb);
}

/** The scalp pattern of a ground-truth source. */
export function pattern(truth: GroundTruth, sourceId: string): number[] {
  const s = truth.sources.find((x) => x.id === sourceId);
  if (!s) throw new Error(`ground truth has no source '${sourceId}'`);
  return s.pattern;
}

/**
 * Share of a component's energy on the training epochs that falls inside the truth's windows of
 * the given artifact kinds (epoch i starts at sample round(onsetS_i·fs) + offset).
 */
export function energyShareInside(truth: GroundTruth, kinds: string[], acts: Float64Array[], onsetsS: Float64Array, offset: number, fs: number): number {
  let inside = 0, total = 0;
  acts.forEach((x, i) => {
    const s0 = Math.round(onsetsS[i]! * fs) + offset;
    const mask = new Uint8Array(x.length);
    for (const a of truth.artifacts) {
      if (!kinds.includes(a.kind)) continue;
      for (let t = Math.max(a.startSample, s0); t < Math.min(a.endSample, s0 + x.length); t++) mask[t - s0] = 1;
    }
    for (let t = 0; t < x.length; t++) { total += x[t]! ** 2; if (mask[t]) inside += x[t]! ** 2; }
  });
  return inside / total;
}
