import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { commonAverageReference, commonAverageReferenceInPlace } from '../../../shared/dsp/reference';
import { ShapeError } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';

const fx = JSON.parse(readFileSync(new URL('../../fixtures/dsp/car.json', import.meta.url), 'utf8')) as
  { x: number[][]; exclude: boolean[]; expected: { all: number[][]; withExclude: number[][] } };
const x = fx.x.map((r) => Float64Array.from(r));

describe('commonAverageReference', () => {
  it('matches numpy x - mean(x) over all channels', () => {
    const y = commonAverageReference(x);
    // Reference: tests/fixtures/dsp/car.json (numpy); 1e-12 µV: sums of six doubles, order differs.
    y.forEach((r, ch) => expectAllClose(r, fx.expected.all[ch]!, { rtol: 1e-12, atol: 1e-12 }));
  });

  it('leaves excluded channels out of the mean and passes them through unchanged', () => {
    const y = commonAverageReference(x, fx.exclude);
    // Reference: tests/fixtures/dsp/car.json, withExclude.
    y.forEach((r, ch) => expectAllClose(r, fx.expected.withExclude[ch]!, { rtol: 1e-12, atol: 1e-12 }));
  });

  it('makes the included channels sum to zero at every sample', () => {
    const y = commonAverageReference(x, fx.exclude);
    for (let i = 0; i < x[0]!.length; i++) {
      let s = 0;
      y.forEach((r, ch) => { if (!fx.exclude[ch]) s += r[i]!; });
      // Invariant of the average reference (Offner 1950): the re-referenced channels sum to zero.
      expect(Math.abs(s)).toBeLessThan(1e-12);
    }
  });

  it('does not modify its input; the in-place form does, with the same numbers, chunk by chunk', () => {
    const copy = x.map((r) => r.slice());
    const whole = commonAverageReference(x);
    // Common practice (STYLE.md §4): does not modify its input.
    copy.forEach((r, ch) => expectAllClose(x[ch]!, r, { rtol: 0, atol: 0 }));
    const buf = x.map((r) => r.slice());
    const scratch = new Float64Array(64);
    for (const [a, b] of [[0, 1], [1, 1], [1, 20], [20, 50]] as const) {
      commonAverageReferenceInPlace(buf.map((r) => r.subarray(a, b)), undefined, scratch);
    }
    // Invariant (STYLE.md §4): chunked equals whole, empty and one-sample chunks included.
    buf.forEach((r, ch) => expectAllClose(r, whole[ch]!, { rtol: 0, atol: 1e-12 }));
  });

  it('spreads a NaN in an included channel to that sample of every included channel only', () => {
    const withNan = x.map((r) => r.slice());
    withNan[0]![5] = NaN;
    const y = commonAverageReference(withNan, fx.exclude);
    // Common practice (STYLE.md §3): NaN is data; the mean at that sample is NaN.
    y.forEach((r, ch) => expect(Number.isNaN(r[5]!)).toBe(!fx.exclude[ch]));
    expect(y.every((r) => Number.isFinite(r[6]!))).toBe(true);
  });

  it('handles a flat channel, one channel, no channels, everything excluded', () => {
    // Common practice: the average of one channel is itself, so it becomes zero.
    expectAllClose(commonAverageReference([Float64Array.of(3, 3, 3)])[0]!, [0, 0, 0], { atol: 0 });
    const flat = [new Float64Array(4).fill(7), Float64Array.of(1, 2, 3, 4)];
    expectAllClose(commonAverageReference(flat)[0]!, [3, 2.5, 2, 1.5], { atol: 1e-15 });
    expect(commonAverageReference([])).toEqual([]);
    expectAllClose(commonAverageReference(flat, [true, true])[1]!, [1, 2, 3, 4], { atol: 0 });
  });

  it('rejects mismatched shapes, naming the field', () => {
    // STYLE.md §3: wrong shape is an error naming the field.
    expect(() => commonAverageReference(x, [true])).toThrow(ShapeError);
    expect(() => commonAverageReference(x, [true])).toThrow(/^exclude:/);
    expect(() => commonAverageReference([x[0]!, x[1]!.subarray(1)])).toThrow(/^x:/);
  });
});
