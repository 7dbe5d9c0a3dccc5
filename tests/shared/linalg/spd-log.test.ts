import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { spdLog } from '../../../shared/linalg/spd-log';
import { expectAllClose } from '../../helpers/all-close';

const fx = JSON.parse(readFileSync(new URL('../../fixtures/linalg/spd_log.json', import.meta.url), 'utf8')) as
  { cases: { name: string; n: number; a: number[]; logm: number[] }[] };

describe('spdLog', () => {
  // Reference: tests/fixtures/linalg/spd_log.json, scipy.linalg.logm (Schur-Padé, Al-Mohy & Higham
  // 2012) of seeded SPD matrices (condition up to 1e4) and of a whitened trial covariance.
  it.each(fx.cases)('matches scipy.linalg.logm for $name', (c) => {
    const out = spdLog(Float64Array.from(c.a), c.n);
    expectAllClose(out, c.logm, { rtol: 1e-9, atol: 1e-11 });
  });

  // Definition: log of a diagonal matrix is the log of its entries; log I = 0 (common practice).
  it('takes the log of a diagonal matrix entrywise and gives exact symmetry', () => {
    const out = spdLog(Float64Array.of(Math.E, 0, 0, 0, 1, 0, 0, 0, Math.E ** 2), 3);
    expectAllClose(out, [1, 0, 0, 0, 0, 0, 0, 0, 2], { atol: 1e-14 });
    const r = spdLog(Float64Array.of(2, 0.3, 0.3, 1), 2);
    expect(r[1]).toBe(r[2]);
  });

  it('floors eigenvalues of a singular matrix instead of returning -Infinity', () => {
    const out = spdLog(Float64Array.of(1, 1, 1, 1), 2); // eigenvalues 2 and 0
    expect(Array.from(out).every(Number.isFinite)).toBe(true);
  });
});
