/**
 * Shape checks for feature-row data ([trial][feature]) shared by the feature stages.
 */
import { ShapeError } from '../../types';
import type { FeatureRows } from '../pipeline';

/**
 * Checks that every row has the same length (and `features` of them, when given).
 * @returns the feature count
 */
export function checkRows(x: FeatureRows, field = 'x', features?: number): number {
  const p = features ?? x[0]?.length ?? 0;
  for (let i = 0; i < x.length; i++) {
    if (x[i]!.length !== p) throw new ShapeError(`${field}[${i}]`, `expected ${p} features, got ${x[i]!.length}`);
  }
  return p;
}
