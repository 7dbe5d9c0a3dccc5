import { ParamError, ShapeError } from '../types';

/**
 * A cascade of second-order sections (biquads), applied in row order.
 * Each row is [b0, b1, b2, 1, a1, a2]: H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2),
 * the layout of SciPy's `output='sos'` (Virtanen et al. 2020, SciPy 1.0, Nat Methods 17:261-272).
 */
export type Sos = number[][]; // [section][6]

/** Band type of a Butterworth design. */
export type FilterKind = 'lowpass' | 'highpass' | 'bandpass' | 'bandstop';

/**
 * Checks that `sos` has at least one row of six finite numbers with a0 = 1.
 * @param field the argument name used in the error
 * @throws ShapeError when a row is not six long; ParamError when a0 is not 1 or a value is not finite
 */
export function checkSos(sos: Sos, field = 'sos'): void {
  if (!Array.isArray(sos) || sos.length === 0) {
    throw new ShapeError(field, `expected [sections >= 1][6], got ${Array.isArray(sos) ? '[0]' : typeof sos}`);
  }
  sos.forEach((row, i) => {
    if (!Array.isArray(row) || row.length !== 6) {
      throw new ShapeError(field, `expected [${sos.length}][6], row ${i} has length ${Array.isArray(row) ? row.length : typeof row}`);
    }
    if (row[3] !== 1) throw new ParamError(field, `row ${i}: a0 must be 1, got ${row[3]}`);
    if (!row.every(Number.isFinite)) throw new ParamError(field, `row ${i}: coefficients must be finite`);
  });
}

/**
 * Packs the rows into one typed array [b0, b1, b2, a1, a2] per section (a0 dropped), which the
 * filtering kernels read.
 */
export function packSos(sos: Sos): Float64Array {
  const packed = new Float64Array(sos.length * 5);
  sos.forEach((row, s) => {
    packed[5 * s] = row[0]!; packed[5 * s + 1] = row[1]!; packed[5 * s + 2] = row[2]!;
    packed[5 * s + 3] = row[4]!; packed[5 * s + 4] = row[5]!;
  });
  return packed;
}
