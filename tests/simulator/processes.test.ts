import { describe, expect, it } from 'vitest';
import reference from '../fixtures/simulator/process_reference.json';
import { expectAllClose, expectClose } from '../helpers/all-close';
import { designPink, designResonator, pinkProcess, resonatorProcess } from '../../simulator/processes';

/** |H(e^{iω})|^2 of the pink cascade at f Hz. */
function pinkPowerGain(d: ReturnType<typeof designPink>, f: number, fs: number): number {
  const w = (2 * Math.PI * f) / fs;
  let g = 1;
  for (let k = 0; k < d.a.length; k++) {
    const num = (1 - d.b[k]! * Math.cos(w)) ** 2 + (d.b[k]! * Math.sin(w)) ** 2;
    const den = (1 - d.a[k]! * Math.cos(w)) ** 2 + (d.a[k]! * Math.sin(w)) ** 2;
    g *= num / den;
  }
  return g;
}

describe('generator noise shapers', () => {
  it.each(reference.resonators)('the resonator at $frequencyHz Hz has unit variance per unit input (fs $sampleRateHz)', (r) => {
    const d = designResonator(r.frequencyHz, r.bandwidthHz, r.sampleRateHz);
    // Reference: tests/fixtures/simulator/process_reference.json (SciPy lfilter impulse energy);
    // the closed-form AR(2) variance times g^2 must be 1.
    expectClose(d.g * d.g * r.variancePerUnitInput, 1, { rtol: 1e-9 });
  });

  it.each(reference.pinks)('the 1/f cascade (chi $exponent, fs $sampleRateHz) matches SciPy', (p) => {
    const d = designPink(p.exponent, p.sampleRateHz);
    // Reference: tests/fixtures/simulator/process_reference.json (same recipe, SciPy lfilter/freqz).
    expect(d.a.length).toBe(p.sections);
    expectClose(d.unitGain * d.unitGain * p.variancePerUnitInput, 1, { rtol: 1e-6 });
    expectAllClose(p.freqsHz.map((f) => pinkPowerGain(d, f, p.sampleRateHz)), p.powerGain, { rtol: 1e-9 });
  });

  it.each([0.7, 1, 1.5, 2])('the cascade power falls as 1/f^%s between 1 and 40 Hz', (chi) => {
    const d = designPink(chi, 250);
    const fs = Array.from({ length: 60 }, (_, i) => 10 ** (Math.log10(1) + (i / 59) * Math.log10(40)));
    const ys = fs.map((f) => Math.log10(pinkPowerGain(d, f, 250)));
    const xs = fs.map((f) => Math.log10(f));
    const mx = xs.reduce((a, b) => a + b) / xs.length;
    const my = ys.reduce((a, b) => a + b) / ys.length;
    const slope = xs.reduce((s, x, i) => s + (x - mx) * (ys[i]! - my), 0) / xs.reduce((s, x) => s + (x - mx) ** 2, 0);
    // Keshner 1982 (Proc IEEE 70(3)): pole-zero pairs at a fixed ratio give an average slope of -chi.
    expectClose(slope, -chi, { atol: 0.06 });
  });

  it('filtering in chunks equals filtering at once', () => {
    const d = designPink(1.5, 250);
    const r = designResonator(10, 1.5, 250);
    const x = Float64Array.from({ length: 1000 }, (_, i) => Math.sin(i * 0.37) + ((i * 7919) % 13) / 13);
    const whole = x.slice();
    pinkProcess(d, new Float64Array(2 * d.a.length), whole, 0, whole.length);
    resonatorProcess(r, new Float64Array(2), whole, 0, whole.length);
    const parts = x.slice();
    const ps = new Float64Array(2 * d.a.length);
    const rs = new Float64Array(2);
    for (const [a, b] of [[0, 0], [0, 1], [1, 333], [333, 334], [334, 1000]] as const) {
      pinkProcess(d, ps, parts, a, b);
      resonatorProcess(r, rs, parts, a, b);
    }
    // Invariant (STYLE.md §3): chunked equals whole, bit for bit.
    expectAllClose(parts, whole, { rtol: 0, atol: 0 });
  });
});
