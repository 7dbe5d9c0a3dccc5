import { describe, expect, it } from 'vitest';
import { amariIndex } from '../../../shared/ica/amari';
import { createRng } from '../../../shared/linalg/random';
import { ParamError, ShapeError } from '../../../shared/types';
import { expectClose } from '../../helpers/all-close';

describe('amariIndex', () => {
  it('is zero for the identity and for a scaled permutation', () => {
    // REFERENCES.md §3 table: P = I or [[0,2.5,0],[−0.1,0,0],[0,0,7]] gives E = 0.
    expect(amariIndex([[1, 0, 0], [0, 1, 0], [0, 0, 1]])).toBe(0);
    expect(amariIndex([[0, 2.5, 0], [-0.1, 0, 0], [0, 0, 7]])).toBe(0);
  });

  it('matches the worked example and the worst case', () => {
    const pex = [[1, 0.1, 0], [0, 1, 0.2], [0.05, 0, 1]];
    // REFERENCES.md §3 table [calc]: raw E = 0.7, normalised 0.058333…
    expectClose(amariIndex(pex, false), 0.7, { rtol: 1e-14 });
    expectClose(amariIndex(pex), 0.058333333333333334, { rtol: 1e-14 });
    // REFERENCES.md §3 table: P = ones(3,3) gives raw 12, normalised 1.0.
    expectClose(amariIndex([[1, 1, 1], [1, 1, 1], [1, 1, 1]], false), 12, { rtol: 1e-15 });
    expectClose(amariIndex(Array.from({ length: 3 }, () => Float64Array.of(1, 1, 1))), 1, { rtol: 1e-15 });
  });

  it('averages about 0.426 for random Gaussian 3×3 matrices', () => {
    const rng = createRng(0);
    let sum = 0;
    const draws = 20000;
    for (let d = 0; d < draws; d++) sum += amariIndex([0, 1, 2].map(() => [rng.nextNormal(), rng.nextNormal(), rng.nextNormal()]));
    // REFERENCES.md §3 [calc]: mean 0.42596 over 1e5 draws; our 2e4 draws have sd ≈ 0.0008, allow 0.005.
    expectClose(sum / draws, 0.42596, { atol: 0.005 });
  });

  it('rejects a non-square matrix and a zero row', () => {
    // Definition: the index needs a square P with no all-zero row or column.
    expect(() => amariIndex([[1, 0], [0, 1, 0]])).toThrow(ShapeError);
    expect(() => amariIndex([[0, 0], [0, 1]])).toThrow(ParamError);
  });
});
