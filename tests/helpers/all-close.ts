import { expect } from 'vitest';

export interface Tolerance { rtol?: number; atol?: number }

/**
 * The one tolerance check used by every numeric test: passes when
 * |a - e| <= atol + rtol * |e| for every element. On failure it reports the first bad index,
 * both values and the largest error, which is what one needs to judge a numeric regression.
 */
export function expectAllClose(actual: ArrayLike<number>, expected: ArrayLike<number>,
                               { rtol = 1e-9, atol = 0 }: Tolerance = {}): void {
  expect(actual.length, 'length').toBe(expected.length);
  let firstBad = -1;
  let maxErr = 0;
  let maxAt = -1;
  for (let i = 0; i < expected.length; i++) {
    const a = actual[i]!;
    const e = expected[i]!;
    const err = Math.abs(a - e);
    const bothNaN = Number.isNaN(a) && Number.isNaN(e);
    if (!bothNaN && (Number.isNaN(err) || err > maxErr)) { maxErr = Number.isNaN(err) ? Infinity : err; maxAt = i; }
    if (!bothNaN && !(err <= atol + rtol * Math.abs(e)) && firstBad < 0) firstBad = i;
  }
  if (firstBad >= 0) {
    expect.fail(`not close at index ${firstBad}: actual ${actual[firstBad]}, expected ${expected[firstBad]} ` +
      `(rtol ${rtol}, atol ${atol}); largest error ${maxErr} at index ${maxAt}`);
  }
}

/** Same check for a scalar. */
export function expectClose(actual: number, expected: number, tol: Tolerance = {}): void {
  expectAllClose([actual], [expected], tol);
}
