import { afterEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import { COMMON_32, positionOf } from '../../../shared/montage';
import ScalpMap from '../../../src/components/ScalpMap.vue';
import { evaluateSpline, fitScalpSpline, headRadius, placeValues, scalpGrid } from '../../../src/components/scalp-interp';
import { expectAllClose } from '../../helpers/all-close';

/** A left-right dipole-like map: value = u (right ear positive), plus a bump over C3 (invented). */
function pattern(names: readonly string[]): number[] {
  return names.map((n) => {
    const p = positionOf(n)!;
    return p.u + 2 * Math.exp(-((p.u + 0.5) ** 2 + p.v ** 2) / 0.05);
  });
}

describe('ScalpMap', () => {
  afterEach(() => {
    vi.restoreAllMocks();
  });

  it('renders the 32-channel montage with one dot per electrode and no warnings or errors', () => {
    const warn = vi.spyOn(console, 'warn');
    const error = vi.spyOn(console, 'error');
    const w = mount(ScalpMap, { props: { channelNames: COMMON_32, values: pattern(COMMON_32), caption: 'IC 3' } });
    // COMMON_32 (shared/montage, REFERENCES.md §8 "in 32" column) has 32 positioned electrodes.
    expect(w.findAll('.scalp__electrode')).toHaveLength(32);
    expect(w.find('.scalp__unplaced').exists()).toBe(false);
    expect(w.get('figcaption').text()).toBe('IC 3');
    expect(warn).not.toHaveBeenCalled();
    expect(error).not.toHaveBeenCalled();
    w.unmount();
  });

  it('names the label on hover and lists channels it cannot place', async () => {
    const w = mount(ScalpMap, { props: { channelNames: [...COMMON_32, 'EOG1'], values: [...pattern(COMMON_32), 1] } });
    expect(w.findAll('.scalp__electrode')).toHaveLength(32);
    // 'EOG1' is not a 10-10 name (shared/montage positionOf returns undefined).
    expect(w.get('.scalp__unplaced').text()).toContain('EOG1');
    await w.findAll('.scalp__electrode')[14]!.trigger('mouseenter');
    // COMMON_32[14] is C3 (shared/montage/positions-1010.ts COMMON_32_NAMES).
    expect(w.get('.scalp__label').text()).toBe('C3');
    w.unmount();
  });
});

describe('scalp interpolation', () => {
  it('passes through every electrode value (the spline interpolates exactly)', () => {
    const { placed } = placeValues(COMMON_32, pattern(COMMON_32));
    const spline = fitScalpSpline(placed);
    // Sandwell 1987: the biharmonic spline's coefficients solve for an exact fit at the data points.
    expectAllClose(placed.map((p) => evaluateSpline(spline, p.u, p.v)), placed.map((p) => p.value), { rtol: 1e-8, atol: 1e-9 });
  });

  it('gives a mirror-image map for mirror-image values', () => {
    // Invariant, no reference needed: values odd in u give a grid odd under left-right mirroring.
    const values = COMMON_32.map((n) => positionOf(n)!.u ** 3);
    const { placed } = placeValues(COMMON_32, values);
    const size = 24;
    const grid = scalpGrid(fitScalpSpline(placed), size, headRadius(placed));
    const mirrored = new Float64Array(size * size);
    for (let r = 0; r < size; r++) for (let c = 0; c < size; c++) mirrored[r * size + c] = -grid[r * size + (size - 1 - c)]!;
    expectAllClose(grid, mirrored, { rtol: 1e-7, atol: 1e-9 });
  });

  it('leaves the grid empty (NaN) outside the head circle', () => {
    const { placed } = placeValues(COMMON_32, pattern(COMMON_32));
    const grid = scalpGrid(fitScalpSpline(placed), 10, headRadius(placed));
    // Corners lie outside the inscribed circle (geometry).
    expect(Number.isNaN(grid[0]!)).toBe(true);
    expect(Number.isFinite(grid[5 * 10 + 5]!)).toBe(true);
  });
});
